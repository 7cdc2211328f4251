//! Running a parsed command: reading inputs (files, standard input, streams of one job per line),
//! asking the engine, and writing each result tagged with its input. The engine itself does no IO.

use crate::args::{Cli, Command, Format, Inputs};
use crate::text;
use clap::Parser;
use serde::Serialize;
use serde_json::Value;
use std::ffi::OsString;
use std::io::{IsTerminal, Read, Write};
use std::process::ExitCode;
use tapline_core::tools::{balance, diagnose, plan, size, start};
use tapline_core::whatif::{sweep, sweep_csv, sweep_points, what_if};
use tapline_core::{library, load_job, report, EngineError};

/// Exit code for bad input: usage, unreadable file, invalid JSON or fields.
pub const EXIT_BAD_INPUT: u8 = 2;
/// Exit code for a network that does not solve.
pub const EXIT_NO_SOLVE: u8 = 3;

/// A failure with its exit code.
#[derive(Debug)]
pub struct Failure {
    pub code: u8,
    pub message: String,
}

fn bad(message: impl Into<String>) -> Failure {
    Failure {
        code: EXIT_BAD_INPUT,
        message: message.into(),
    }
}

fn engine(e: EngineError) -> Failure {
    match e {
        EngineError::Solve(s) => Failure {
            code: EXIT_NO_SOLVE,
            message: format!("no solution: {s}"),
        },
        other => bad(other.to_string()),
    }
}

/// The whole program: parse, run, print, and the exit code.
pub fn main(args: impl IntoIterator<Item = OsString>) -> ExitCode {
    let cli = match Cli::try_parse_from(args) {
        Ok(cli) => cli,
        Err(e) => {
            // clap prints help and version to standard output (exit 0) and usage errors to
            // standard error (exit 2).
            let _ = e.print();
            return ExitCode::from(if e.use_stderr() { EXIT_BAD_INPUT } else { 0 });
        }
    };
    let terminal = std::io::stdout().is_terminal();
    let outcome = run(cli.command, terminal);
    let stdout = std::io::stdout();
    let mut out = stdout.lock();
    let _ = out.write_all(outcome.stdout.as_bytes());
    let _ = out.flush();
    if !outcome.stderr.is_empty() {
        eprint!("{}", outcome.stderr);
    }
    ExitCode::from(outcome.code)
}

/// What a run prints and its exit code.
#[derive(Debug, Default)]
pub struct Outcome {
    pub stdout: String,
    pub stderr: String,
    pub code: u8,
}

impl Outcome {
    fn ok(stdout: String) -> Outcome {
        Outcome {
            stdout,
            ..Outcome::default()
        }
    }

    fn failed(f: Failure) -> Outcome {
        Outcome {
            stderr: f.message + "\n",
            code: f.code,
            ..Outcome::default()
        }
    }
}

fn read_input(path: &str) -> Result<String, Failure> {
    if path == "-" {
        let mut s = String::new();
        std::io::stdin()
            .read_to_string(&mut s)
            .map_err(|e| bad(format!("standard input: cannot read ({e})")))?;
        Ok(s)
    } else {
        std::fs::read_to_string(path).map_err(|e| bad(format!("{path}: cannot read ({e})")))
    }
}

fn pretty<T: Serialize>(value: &T) -> Result<String, Failure> {
    serde_json::to_string_pretty(value)
        .map(|s| s + "\n")
        .map_err(|e| bad(format!("cannot write the result as JSON ({e})")))
}

/// One result: its JSON value and its text for people.
struct Done {
    json: Value,
    text: String,
}

fn done<T: Serialize>(value: &T, text: String) -> Result<Done, Failure> {
    Ok(Done {
        json: serde_json::to_value(value)
            .map_err(|e| bad(format!("cannot write the result as JSON ({e})")))?,
        text,
    })
}

/// Runs one command.
pub fn run(command: Command, terminal: bool) -> Outcome {
    let format =
        |f: Option<Format>| f.unwrap_or(if terminal { Format::Text } else { Format::Json });
    match command {
        Command::Library => match pretty(&library_json()) {
            Ok(s) => Outcome::ok(s),
            Err(f) => Outcome::failed(f),
        },
        Command::Demo => Outcome::ok(format!("{}\n", tapline_core::demo::DEMO_JOB)),
        Command::Sweep { file, csv, points } => {
            let result = (|| {
                let (_, job) = load_job(&read_input(&file)?).map_err(engine)?;
                let s = sweep(&job, &sweep_points(usize::from(points)))
                    .map_err(|e| engine(EngineError::Solve(e)))?;
                if csv {
                    Ok(sweep_csv(&s))
                } else {
                    pretty(&s)
                }
            })();
            match result {
                Ok(s) => Outcome::ok(s),
                Err(f) => Outcome::failed(f),
            }
        }
        Command::Solve(inputs) => {
            let f = format(inputs.format);
            each(&inputs, f, |text| {
                let (_, job) = load_job(text).map_err(engine)?;
                let r = report::analyze(&job).map_err(|e| engine(EngineError::Solve(e)))?;
                done(&r, text::report(&r))
            })
        }
        Command::Whatif(inputs) => {
            let f = format(inputs.format);
            each(&inputs, f, |text| {
                let (_, job) = load_job(text).map_err(engine)?;
                let w = what_if(&job).map_err(|e| engine(EngineError::Solve(e)))?;
                done(&w, text::what_if(&w))
            })
        }
        Command::Diagnose(inputs) => {
            let f = format(inputs.format);
            each(&inputs, f, |text| {
                if is_job(text) {
                    let (file, job) = load_job(text).map_err(engine)?;
                    let h = diagnose::history(&job, &file);
                    if h.sets.is_empty() {
                        return Err(bad(
                            "readings: the job has no sets of readings to diagnose".to_string()
                        ));
                    }
                    return done(&h, text::history(&h));
                }
                let readings = diagnose::parse_readings(text).map_err(|e| bad(e.to_string()))?;
                let d = diagnose::diagnose(&readings).map_err(|e| bad(e.to_string()))?;
                done(&d, text::diagnosis(&d))
            })
        }
        Command::Balance {
            inputs,
            flipped,
            running_only,
        } => {
            let f = format(inputs.format);
            let layout = if flipped {
                balance::Layout::Flipped
            } else {
                balance::Layout::Standard
            };
            let basis = if running_only {
                balance::Basis::RunningNow
            } else {
                balance::Basis::Rated
            };
            each(&inputs, f, |text| {
                let (_, job) = load_job(text).map_err(engine)?;
                let b = balance::balance_with(&job, layout, basis);
                done(&b, text::balance(&b))
            })
        }
        Command::Size(inputs) => {
            let f = format(inputs.format);
            each(&inputs, f, |text| {
                let run = size::parse_run(text).map_err(|ps| {
                    bad(ps
                        .iter()
                        .map(|p| p.to_string())
                        .collect::<Vec<_>>()
                        .join("\n"))
                })?;
                let table = size::size(&run);
                done(&table, text::sizing(&table))
            })
        }
        Command::Plan(inputs) => {
            let f = format(inputs.format);
            each(&inputs, f, |text| {
                let (_, job) = load_job(text).map_err(engine)?;
                let p = plan::plan(&job).map_err(|e| engine(EngineError::Solve(e)))?;
                done(&p, text::plan(&p))
            })
        }
        Command::Start {
            inputs,
            load,
            starts_per_hour,
        } => {
            let f = format(inputs.format);
            if !(starts_per_hour.is_finite() && (0.01..=3600.0).contains(&starts_per_hour)) {
                return Outcome::failed(bad(format!(
                    "--starts-per-hour: must be a number from 0.01 to 3600 (got {starts_per_hour})"
                )));
            }
            each(&inputs, f, |text| {
                let (_, job) = load_job(text).map_err(engine)?;
                let s = start::start(&job, &load, starts_per_hour).map_err(|e| match e {
                    start::StartError::Solve(s) => engine(EngineError::Solve(s)),
                    other => bad(other.to_string()),
                })?;
                done(&s, text::start(&s))
            })
        }
    }
}

/// Runs `work` on every input. One input prints its result as it is (pretty JSON or text) and
/// its problems on standard error; several inputs, or a stream of lines, print one result per
/// input tagged with where it came from, and the exit code is the worst of them.
fn each(inputs: &Inputs, format: Format, work: impl Fn(&str) -> Result<Done, Failure>) -> Outcome {
    let mut items: Vec<(String, Result<String, Failure>)> = Vec::new();
    for path in &inputs.files {
        let label = if path == "-" {
            "standard input".to_string()
        } else {
            path.clone()
        };
        match read_input(path) {
            Err(f) => items.push((label, Err(f))),
            Ok(text) if inputs.lines => {
                for (n, line) in text.lines().enumerate() {
                    if !line.trim().is_empty() {
                        items.push((format!("{label}:{}", n + 1), Ok(line.to_string())));
                    }
                }
            }
            Ok(text) => items.push((label, Ok(text))),
        }
    }
    if items.len() == 1 && !inputs.lines {
        let (_, text) = items.remove(0);
        return match text.and_then(|t| work(&t)) {
            Ok(d) => Outcome::ok(match format {
                Format::Json => pretty(&d.json).unwrap_or_default(),
                Format::Text => d.text,
            }),
            Err(f) => Outcome::failed(f),
        };
    }
    let mut out = Outcome::default();
    for (label, text) in items {
        let result = text.and_then(|t| work(&t));
        let code = result.as_ref().map_or_else(|f| f.code, |_| 0);
        out.code = out.code.max(code);
        match (format, result) {
            (Format::Json, Ok(d)) => {
                let line = serde_json::json!({"input": label, "exit": 0, "result": d.json});
                out.stdout.push_str(&format!("{line}\n"));
            }
            (Format::Json, Err(f)) => {
                let problems: Vec<&str> = f.message.lines().collect();
                let line =
                    serde_json::json!({"input": label, "exit": f.code, "problems": problems});
                out.stdout.push_str(&format!("{line}\n"));
            }
            (Format::Text, Ok(d)) => out.stdout.push_str(&format!("== {label} ==\n{}\n", d.text)),
            (Format::Text, Err(f)) => out.stdout.push_str(&format!(
                "== {label} ==\nexit {}:\n{}\n\n",
                f.code, f.message
            )),
        }
    }
    out
}

#[derive(Serialize)]
struct LibraryEntry {
    id: &'static str,
    name: &'static str,
    watts: f64,
    rated_v: f64,
    connect: &'static str,
    model: &'static str,
    power_factor: f64,
    note: &'static str,
}

fn library_json() -> Vec<LibraryEntry> {
    library::APPLIANCES
        .iter()
        .map(|a| LibraryEntry {
            id: a.id,
            name: a.name,
            watts: a.watts,
            rated_v: a.rated_v,
            connect: match a.hookup {
                library::Hookup::ToNeutral => "leg to neutral",
                library::Hookup::Across => "leg to leg",
            },
            model: a.model,
            power_factor: a.power_factor,
            note: "typical values, common practice",
        })
        .collect()
}

/// True when the text is a job file (it has `loads`) rather than a readings file: `diagnose`
/// takes either.
fn is_job(text: &str) -> bool {
    serde_json::from_str::<serde_json::Value>(text)
        .ok()
        .and_then(|v| v.as_object().map(|o| o.contains_key("loads")))
        .unwrap_or(false)
}

#[cfg(test)]
mod tests {
    use super::*;
    use tapline_core::solve::SolveError;

    /// A solve that does not converge maps to exit code 3 with its message; valid jobs cannot be
    /// made to fail on purpose, so the mapping is checked directly.
    #[test]
    fn no_convergence_exits_3() {
        let f = engine(EngineError::Solve(SolveError::NoConvergence {
            iterations: 200,
        }));
        assert_eq!(f.code, EXIT_NO_SOLVE);
        assert!(f.message.contains("did not settle after 200 iterations"));
        let f = engine(EngineError::Solve(SolveError::Singular));
        assert_eq!(f.code, EXIT_NO_SOLVE);
    }
}
