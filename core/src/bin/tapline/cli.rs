//! Argument handling and file reading for the `tapline` command. The engine itself does no IO;
//! this module reads the job and hands text to it.

use serde::Serialize;
use std::io::Read;
use tapline_core::tools::{balance, diagnose};
use tapline_core::whatif::{sweep, sweep_csv, sweep_points, what_if};
use tapline_core::{library, load_job, report, EngineError};

/// Exit code for bad input: usage, unreadable file, invalid JSON or fields.
pub const EXIT_BAD_INPUT: u8 = 2;
/// Exit code for a network that does not solve.
pub const EXIT_NO_SOLVE: u8 = 3;

pub const USAGE: &str = "\
tapline: what every appliance sees when a service neutral is intact, loose or open

usage:
  tapline solve JOB.json          report for the job (JSON)
  tapline whatif JOB.json         the job with the neutral intact, loose and open (JSON)
  tapline sweep JOB.json [--csv] [--points N]
                                  every appliance's voltage as the neutral resistance goes from
                                  0 to open (JSON, or CSV with --csv; N from 3 to 5000, default 200)
  tapline diagnose READINGS.json  neutral and hot resistance from meter readings, with a verdict (JSON)
  tapline balance JOB.json [--flipped]
                                  which breakers to swap so the neutral carries the least current
                                  (JSON); --flipped when position 1 is on L2 rather than L1
  tapline library                 typical appliances (JSON)
  tapline demo                    the demo job (JSON)

JOB.json may be - for standard input.
exit codes: 0 ok, 2 bad input (one line per problem on standard error), 3 the network did not solve
";

/// A failure with its exit code.
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

fn json<T: Serialize>(value: &T) -> Result<String, Failure> {
    serde_json::to_string_pretty(value)
        .map(|s| s + "\n")
        .map_err(|e| bad(format!("cannot write the result as JSON ({e})")))
}

/// Runs one command and returns what it prints on standard output.
pub fn run(args: Vec<String>) -> Result<String, Failure> {
    let Some(command) = args.first().map(String::as_str) else {
        return Err(bad(USAGE));
    };
    let rest = &args[1..];
    match command {
        "-h" | "--help" | "help" => Ok(USAGE.to_string()),
        "library" => json(&library_json()),
        "demo" => Ok(format!("{}\n", tapline_core::demo::DEMO_JOB)),
        "solve" | "whatif" => {
            let path = single_path(command, rest)?;
            let (_, job) = load_job(&read_input(path)?).map_err(engine)?;
            if command == "solve" {
                json(&report::analyze(&job).map_err(|e| engine(EngineError::Solve(e)))?)
            } else {
                json(&what_if(&job).map_err(|e| engine(EngineError::Solve(e)))?)
            }
        }
        "diagnose" => {
            let path = single_path(command, rest)?;
            let readings =
                diagnose::parse_readings(&read_input(path)?).map_err(|e| bad(e.to_string()))?;
            json(&diagnose::diagnose(&readings).map_err(|e| bad(e.to_string()))?)
        }
        "balance" => {
            let flipped = rest.iter().any(|a| a == "--flipped");
            let files: Vec<String> = rest.iter().filter(|a| *a != "--flipped").cloned().collect();
            let path = single_path(command, &files)?;
            let (_, job) = load_job(&read_input(path)?).map_err(engine)?;
            let layout = if flipped {
                balance::Layout::Flipped
            } else {
                balance::Layout::Standard
            };
            json(&balance::balance(&job, layout))
        }
        "sweep" => {
            let mut path = None;
            let mut csv = false;
            let mut points = 200usize;
            let mut it = rest.iter();
            while let Some(a) = it.next() {
                match a.as_str() {
                    "--csv" => csv = true,
                    "--points" => {
                        let n = it.next().ok_or_else(|| bad("--points: needs a number"))?;
                        points = n
                            .parse()
                            .ok()
                            .filter(|n| (3..=5000).contains(n))
                            .ok_or_else(|| {
                                bad(format!(
                                    "--points: must be a whole number from 3 to 5000 (got {n:?})"
                                ))
                            })?;
                    }
                    p if path.is_none() && (p == "-" || !p.starts_with('-')) => path = Some(p),
                    other => {
                        return Err(bad(format!(
                            "sweep: unexpected argument {other:?}\n\n{USAGE}"
                        )))
                    }
                }
            }
            let path = path.ok_or_else(|| bad(format!("sweep: needs a job file\n\n{USAGE}")))?;
            let (_, job) = load_job(&read_input(path)?).map_err(engine)?;
            let s =
                sweep(&job, &sweep_points(points)).map_err(|e| engine(EngineError::Solve(e)))?;
            if csv {
                Ok(sweep_csv(&s))
            } else {
                json(&s)
            }
        }
        other => Err(bad(format!("unknown command {other:?}\n\n{USAGE}"))),
    }
}

fn single_path<'a>(command: &str, rest: &'a [String]) -> Result<&'a str, Failure> {
    match rest {
        [p] => Ok(p.as_str()),
        [] => Err(bad(format!(
            "{command}: needs a job file (or - for standard input)\n\n{USAGE}"
        ))),
        _ => Err(bad(format!("{command}: takes one job file\n\n{USAGE}"))),
    }
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

    #[test]
    fn help_lists_every_command() {
        let out = run(vec!["--help".to_string()]).ok().unwrap();
        for c in [
            "solve", "whatif", "sweep", "diagnose", "balance", "library", "demo",
        ] {
            assert!(out.contains(&format!("tapline {c}")), "{c}");
        }
    }
}
