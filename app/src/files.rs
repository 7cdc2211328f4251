//! Moving job files in and out of the browser: export as a download, import from a file picker.
//! Storage is not touched here; the caller decides what to keep.

use wasm_bindgen::{JsCast, JsValue};
use web_sys::{Blob, BlobPropertyBag, HtmlAnchorElement, HtmlInputElement, Url};

/// Offers `text` as a download named `filename`.
///
/// # Errors
/// A message when the browser refuses.
pub fn download(filename: &str, text: &str) -> Result<(), String> {
    let fail = |e: JsValue| format!("export failed: {e:?}");
    let parts = js_sys::Array::of1(&JsValue::from_str(text));
    let options = BlobPropertyBag::new();
    options.set_type("application/json");
    let blob = Blob::new_with_str_sequence_and_options(&parts, &options).map_err(fail)?;
    let url = Url::create_object_url_with_blob(&blob).map_err(fail)?;
    let document = web_sys::window()
        .and_then(|w| w.document())
        .ok_or_else(|| "export failed: no document".to_string())?;
    let a: HtmlAnchorElement = document
        .create_element("a")
        .map_err(fail)?
        .dyn_into()
        .map_err(|_| "export failed: no anchor".to_string())?;
    a.set_href(&url);
    a.set_download(filename);
    a.click();
    Url::revoke_object_url(&url).map_err(fail)?;
    Ok(())
}

/// A file name for a job: its name with anything unusual replaced, and `.json`.
///
/// Kept: ASCII letters and digits, `-`, and every character outside ASCII that is neither a
/// space nor a control character (the letters of any script; every file system takes them).
/// Replaced: ASCII punctuation and spaces, which file systems and shells treat specially. Testing
/// for "a letter of any script" would bring the standard library's Unicode tables into the module.
pub fn file_name(job_name: &str) -> String {
    let stem: String = job_name
        .chars()
        .map(|c| {
            let kept = c.is_ascii_alphanumeric()
                || c == '-'
                || !(c.is_ascii() || c.is_whitespace() || c.is_control());
            if kept {
                c
            } else {
                '-'
            }
        })
        .collect();
    let stem = stem.trim_matches('-');
    format!("{}.json", if stem.is_empty() { "job" } else { stem })
}

/// Reads the first file chosen in a file input as text.
///
/// # Errors
/// A message when nothing was chosen or the file cannot be read.
pub async fn read_chosen(input: &HtmlInputElement) -> Result<String, String> {
    let file = input
        .files()
        .and_then(|f| f.get(0))
        .ok_or_else(|| "no file chosen".to_string())?;
    let text = wasm_bindgen_futures::JsFuture::from(file.text())
        .await
        .map_err(|e| format!("cannot read the file: {e:?}"))?;
    text.as_string()
        .ok_or_else(|| "the file is not text".to_string())
}

#[cfg(test)]
mod tests {
    use super::file_name;

    #[test]
    fn file_names_are_safe() {
        assert_eq!(
            file_name("27 Larkspur Row (demo)"),
            "27-Larkspur-Row--demo.json"
        );
        assert_eq!(file_name("///"), "job.json");
        assert_eq!(
            file_name("Müller: Ærø\u{3000}Tårn"),
            "Müller--Ærø-Tårn.json"
        );
    }
}
