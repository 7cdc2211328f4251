//! `tapline`: the engine on the command line. See `tapline --help`.

mod args;
mod run;
mod text;

use std::process::ExitCode;

fn main() -> ExitCode {
    run::main(std::env::args_os())
}
