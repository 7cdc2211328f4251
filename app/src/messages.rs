//! The homeowner view's words, kept apart from the code in one catalogue per language
//! (`app/messages/<code>.txt`: `id = text` lines, `{name}` placeholders). A translator adds a
//! language by writing its file from `en.txt` and naming it in [`LANGS`]; the tests refuse a
//! file that lacks an id or a placeholder of the English one.

/// The languages, as (code, name in that language, catalogue).
pub const LANGS: &[(&str, &str, &str)] = &[
    ("en", "English", include_str!("../messages/en.txt")),
    ("es", "Español", include_str!("../messages/es.txt")),
];

/// One language's catalogue.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct Catalogue {
    text: &'static str,
}

impl Catalogue {
    /// The catalogue for a language code; English for a code it does not have.
    pub fn of(code: &str) -> Catalogue {
        let text = LANGS
            .iter()
            .find(|(c, _, _)| *c == code)
            .unwrap_or(&LANGS[0])
            .2;
        Catalogue { text }
    }

    fn entries(self) -> impl Iterator<Item = (&'static str, &'static str)> {
        self.text
            .lines()
            .filter(|l| !l.trim_start().starts_with('#'))
            .filter_map(|l| l.split_once(" = "))
            .map(|(k, v)| (k.trim(), v.trim()))
    }

    /// The text of message `id`, or the id itself when missing (the tests make sure none is).
    pub fn get(self, id: &str) -> &'static str {
        self.entries()
            .find(|(k, _)| *k == id)
            .map(|(_, v)| v)
            .unwrap_or_else(|| {
                Catalogue::of("en")
                    .entries()
                    .find(|(k, _)| *k == id)
                    .map(|(_, v)| v)
                    .unwrap_or("")
            })
    }

    /// Message `id` with its placeholders filled: `fill("owner.carries", &[("amps", …)])`.
    pub fn fill(self, id: &str, values: &[(&str, &str)]) -> String {
        let mut s = self.get(id).to_string();
        for (k, v) in values {
            s = s.replace(&format!("{{{k}}}"), v);
        }
        s
    }

    /// Every id of the catalogue.
    pub fn ids(self) -> Vec<&'static str> {
        self.entries().map(|(k, _)| k).collect()
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn placeholders(s: &str) -> Vec<&str> {
        let mut out: Vec<&str> = s
            .split('{')
            .skip(1)
            .filter_map(|p| p.split_once('}').map(|(k, _)| k))
            .collect();
        out.sort_unstable();
        out
    }

    #[test]
    fn every_language_has_every_message_with_the_same_placeholders() {
        let en = Catalogue::of("en");
        for (code, _, _) in LANGS {
            let other = Catalogue::of(code);
            let mut ids = other.ids();
            ids.sort_unstable();
            let mut want = en.ids();
            want.sort_unstable();
            assert_eq!(ids, want, "{code}: ids differ from English");
            for id in en.ids() {
                assert!(!other.get(id).is_empty(), "{code}: {id} is empty");
                assert_eq!(
                    placeholders(other.get(id)),
                    placeholders(en.get(id)),
                    "{code}: {id}"
                );
            }
        }
    }

    #[test]
    fn messages_are_filled_and_a_missing_one_falls_back_to_english() {
        let es = Catalogue::of("es");
        assert_eq!(
            es.fill(
                "owner.carries",
                &[("amps", "3.2 A"), ("legs", "L1 12.5 A · L2 9.3 A")]
            ),
            "Ahora mismo el neutro lleva 3.2 A (L1 12.5 A · L2 9.3 A)."
        );
        assert_eq!(Catalogue::of("xx"), Catalogue::of("en"));
        assert_eq!(es.get("no.such.id"), "");
    }
}
