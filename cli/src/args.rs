//! The command line's grammar, parsed by clap: every command has `--help`, the program has
//! `--version`, and an unknown option is an error (exit 2) naming it.

use clap::{Args, Parser, Subcommand, ValueEnum};

/// The cautions every help text and every report carries.
pub const CAUTIONS: &str = "\
CAUTION: electrical work can kill. These figures are estimates to guide a qualified person: treat
the equipment as energized, verify every figure with a meter before acting, keep people clear of
an open or loose neutral and of bonded metal while it is open, and follow local codes, the
authority having jurisdiction and licensed practice.";

const AFTER_HELP: &str = "\
JOB.json may be - for standard input. Several files give one result per file, each tagged with
its input (JSON Lines, or a header per input in text); --lines reads each input as a stream of
jobs, one JSON object per line.

exit codes: 0 ok, 2 bad input (one line per problem on standard error), 3 the network did not
solve; with several inputs, the worst of them.

CAUTION: electrical work can kill. These figures are estimates to guide a qualified person: treat
the equipment as energized, verify every figure with a meter before acting, keep people clear of
an open or loose neutral and of bonded metal while it is open, and follow local codes, the
authority having jurisdiction and licensed practice.";

/// tapline: what every appliance sees when a service neutral is intact, loose or open.
#[derive(Debug, Parser)]
#[command(name = "tapline", version, about, after_help = AFTER_HELP)]
pub struct Cli {
    #[command(subcommand)]
    pub command: Command,
}

/// How results are written.
#[derive(Clone, Copy, Debug, PartialEq, Eq, ValueEnum)]
pub enum Format {
    /// The JSON formats documented in the engine (the default when the output is not a terminal).
    Json,
    /// A summary for people, with the cautions (the default on a terminal).
    Text,
}

/// Where the jobs come from and how results are written.
#[derive(Debug, Args)]
pub struct Inputs {
    /// Job files (`-` for standard input; several allowed).
    #[arg(value_name = "JOB.json", default_value = "-")]
    pub files: Vec<String>,
    /// Read each input as a stream of jobs, one JSON object per line.
    #[arg(long)]
    pub lines: bool,
    /// Output format; JSON unless the output is a terminal.
    #[arg(long, value_enum)]
    pub format: Option<Format>,
}

#[derive(Debug, Subcommand)]
pub enum Command {
    /// The report for each job: every appliance's voltage and outcome, legs, neutral, earth,
    /// transformer and fault currents.
    #[command(after_help = AFTER_HELP)]
    Solve(Inputs),
    /// The job with the neutral intact, loose and open, side by side.
    #[command(after_help = AFTER_HELP)]
    Whatif(Inputs),
    /// Every appliance's voltage as the neutral resistance goes from 0 to open.
    #[command(after_help = AFTER_HELP)]
    Sweep {
        /// The job file (`-` for standard input).
        #[arg(value_name = "JOB.json", default_value = "-")]
        file: String,
        /// Write CSV instead of JSON.
        #[arg(long)]
        csv: bool,
        /// Number of points, from 3 to 5000.
        #[arg(long, default_value_t = 200, value_parser = clap::value_parser!(u16).range(3..=5000))]
        points: u16,
    },
    /// The neutral's and the hots' resistance from meter readings, with a verdict: a readings
    /// file, or a job file (one with `loads`) whose every dated set of readings is diagnosed and the
    /// latest compared with the first.
    #[command(after_help = AFTER_HELP)]
    Diagnose(Inputs),
    /// Which breakers to swap so the neutral carries the least current.
    #[command(after_help = AFTER_HELP)]
    Balance {
        #[command(flatten)]
        inputs: Inputs,
        /// Position 1 is on L2 rather than L1.
        #[arg(long)]
        flipped: bool,
        /// Balance only the appliances running now (by default every appliance counts at its
        /// rating, switched on or not).
        #[arg(long)]
        running_only: bool,
    },
    /// The dip when a motor starts: every appliance's voltage before and at the instant of
    /// starting, visible flicker, and whether the motor can start.
    #[command(after_help = AFTER_HELP)]
    Start {
        #[command(flatten)]
        inputs: Inputs,
        /// The motor's name in the job.
        #[arg(long, value_name = "NAME")]
        load: String,
        /// How often it starts, per hour (sets the flicker threshold).
        #[arg(long, default_value_t = 4.0)]
        starts_per_hour: f64,
    },
    /// What if we add this: the job as found beside the job with its planned appliances
    /// (`"planned": true`): leg and neutral currents, every appliance's voltage, transformer
    /// loading, fault current at the service and how far each leg is below nominal.
    #[command(after_help = AFTER_HELP)]
    Plan(Inputs),
    /// Every standard size of one run side by side: its drop, its ampacity, and the smallest that
    /// meets both (the run format is documented in the engine's `tools/size.rs`).
    #[command(after_help = AFTER_HELP)]
    Size(Inputs),
    /// Typical appliances (JSON).
    Library,
    /// The demo job (JSON).
    Demo,
}
