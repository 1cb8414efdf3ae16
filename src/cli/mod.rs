//! The command line: the same engine for scripts and batch work. This module is the argument
//! schema's top and the helpers every subcommand shares; each subcommand has a module of its own
//! with its clap `Args` struct (each argument declared once, there). Conventions: every output
//! path accepts `-` for standard output, and the commands that read one design accept `-` for
//! standard input; `--json` prints typed JSON on every command that prints a result; no command
//! writes over one of its inputs unless asked (`--in-place`), and no export replaces a file that
//! holds a design; long work shows progress on a terminal (`--quiet` silences it) and Ctrl-C
//! stops it, keeping what was found (exit status 130). Bad input ends with a one-line reason on
//! stderr and a non-zero exit status.

mod compare;
mod dsm;
mod eval;
mod explore;
mod export;
mod fidelity;
mod manual;
mod optimize;
mod period;
mod progress;
mod retarget;
mod state;
mod tisserand;
mod window;

use std::io::Read as _;
use std::path::{Path, PathBuf};
use std::sync::atomic::{AtomicBool, Ordering};

use clap::{Parser, Subcommand, ValueEnum};

use tourwright_astro::time::Epoch;
use tourwright_mission::design::EphemerisChoice;
use tourwright_mission::{MissionDesign, Objective, PreparedTour, files};

pub use compare::compare_text;

/// Tourwright: design gravity-assist tours with patched conics.
#[derive(Parser, Debug)]
#[command(name = "tourwright", version, about, after_help = tourwright_mission::CAUTION)]
pub struct Cli {
    /// What to do; with none, the workbench opens.
    #[command(subcommand)]
    pub command: Option<Command>,
    /// No progress bars on standard error.
    #[arg(long, short, global = true)]
    pub quiet: bool,
}

/// Subcommands.
#[derive(Subcommand, Debug)]
pub enum Command {
    /// Open the workbench (optionally on a design file).
    Gui(GuiArgs),
    /// Evaluate a design: event table and ledger.
    Eval(eval::Args),
    /// Heliocentric ecliptic J2000 states of a planet from an ephemeris source (km, km/s).
    State(state::Args),
    /// Tisserand graph: v∞ contours of planets on (periapsis, apoapsis) radius, and a design's
    /// arcs on them, as CSV.
    Tisserand(tisserand::Args),
    /// n-body check of a design: per encounter the miss, its B-plane components, the change in
    /// v∞ and the departure correction that removes the miss.
    Fidelity(fidelity::Args),
    /// Compare the tour with the best direct transfer in the launch period.
    Compare(compare::Args),
    /// Export tables or the trajectory.
    Export(export::Args),
    /// Window map (porkchop grid) between two bodies or for one leg of a design.
    Window(window::Args),
    /// Adjust a shaped swing-by so that its ballistic leg meets the next body again.
    Retarget(retarget::Args),
    /// Add, move or remove a leg's deep-space manoeuvre (DSM).
    Dsm(dsm::Args),
    /// Optimise a design's dates within its search bounds.
    Optimize(optimize::Args),
    /// Explore planet sequences and rank them (or merge the shards of a survey).
    Explore(explore::Args),
    /// Launch period: the tour re-optimised for each launch day around the design's; the worst
    /// day's C3, Δv and declination, and the margins that cover every day.
    Period(period::Args),
    /// Print a shell completion script (bash, zsh, fish, elvish, powershell).
    Completions(manual::CompletionArgs),
    /// Write the manual pages (roff), one per command.
    Manual(manual::ManualArgs),
}

/// The arguments of `gui`.
#[derive(clap::Args, Debug)]
pub struct GuiArgs {
    /// Design file to open.
    pub file: Option<PathBuf>,
}

/// The ephemeris choice every command that evaluates takes.
#[derive(clap::Args, Debug, Clone, Default)]
pub struct EphemerisArg {
    /// Ephemeris model: mean-elements (JPL approximate elements 1800-2050), mga-benchmark (the
    /// MGA benchmark set's analytic model), kernel:PATH (a JPL SPK kernel such as de421.bsp) or
    /// kernel (the default kernel, TOURWRIGHT_KERNEL); default: the design's (mean-elements
    /// when there is no design).
    #[arg(long, value_parser = EphemerisChoice::parse)]
    pub ephemeris: Option<EphemerisChoice>,
}

/// Multi-revolution branches.
#[derive(Clone, Copy, Debug, ValueEnum)]
pub enum BranchArg {
    /// Izzo's left branch (smaller x).
    Left,
    /// Izzo's right branch (larger x).
    Right,
}

/// Objectives for `optimize` and `explore`.
#[derive(Clone, Copy, Debug, ValueEnum)]
pub enum ObjectiveArg {
    /// Launch v∞ plus every spacecraft Δv.
    Dv,
    /// Spacecraft Δv only (C3 held under the limit).
    ScDv,
    /// Delivered mass with the launch vehicle.
    Mass,
    /// Launch C3.
    C3,
    /// Total time of flight.
    Tof,
}

impl From<ObjectiveArg> for Objective {
    fn from(o: ObjectiveArg) -> Self {
        match o {
            ObjectiveArg::Dv => Objective::TotalDvWithLaunchVinf,
            ObjectiveArg::ScDv => Objective::SpacecraftDv,
            ObjectiveArg::Mass => Objective::DeliveredMass,
            ObjectiveArg::C3 => Objective::LaunchC3,
            ObjectiveArg::Tof => Objective::TimeOfFlight,
        }
    }
}

/// A failure of a command: one line for stderr (empty when the command already said everything on
/// standard output) and the exit status.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct CliError {
    /// The line for stderr.
    pub message: String,
    /// Exit status: 1 for bad input or a failure, 3 when a search found no design meeting every
    /// limit, 130 when interrupted.
    pub status: i32,
}

/// Exit status of a search that found no design meeting every limit.
pub const EXIT_NO_FEASIBLE: i32 = 3;
/// Exit status after Ctrl-C (128 + SIGINT, the shells' convention).
pub const EXIT_INTERRUPTED: i32 = 130;

impl CliError {
    /// An exit status with nothing more to say.
    pub fn status(status: i32) -> Self {
        CliError {
            message: String::new(),
            status,
        }
    }
}

impl From<String> for CliError {
    fn from(message: String) -> Self {
        CliError { message, status: 1 }
    }
}

impl From<&str> for CliError {
    fn from(message: &str) -> Self {
        CliError {
            message: message.to_string(),
            status: 1,
        }
    }
}

/// The outcome of a command.
pub type CliResult = Result<(), CliError>;

/// Run a parsed command line (not `gui`, which the binary handles).
pub fn run(cmd: Command, quiet: bool) -> CliResult {
    progress::set_quiet(quiet);
    match cmd {
        Command::Gui(_) => Err("the workbench is started by the binary".into()),
        Command::Eval(a) => eval::run(a),
        Command::State(a) => state::run(a),
        Command::Tisserand(a) => tisserand::run(a),
        Command::Fidelity(a) => fidelity::run(a),
        Command::Compare(a) => compare::run(a),
        Command::Export(a) => export::run(a),
        Command::Window(a) => window::run(a),
        Command::Retarget(a) => retarget::run(a),
        Command::Dsm(a) => dsm::run(a),
        Command::Optimize(a) => optimize::run(a),
        Command::Explore(a) => explore::run(a),
        Command::Period(a) => period::run(a),
        Command::Completions(a) => manual::completions(a),
        Command::Manual(a) => manual::manual(a),
    }
}

/// True for the path `-`: standard input or output.
pub fn is_dash(p: &Path) -> bool {
    p.as_os_str() == "-"
}

/// Standard output holds a command's data (an output path was `-`): its words go to stderr.
static STDOUT_TAKEN: AtomicBool = AtomicBool::new(false);

/// Claim standard output for data when any of `outputs` is `-`; refuse two outputs there.
fn claim_stdout(outputs: &[Option<&Path>]) -> CliResult {
    let n = outputs.iter().flatten().filter(|p| is_dash(p)).count();
    if n > 1 {
        return Err("only one output can go to standard output (-)".into());
    }
    STDOUT_TAKEN.store(n == 1, Ordering::Relaxed);
    Ok(())
}

/// Print a line for the user: to standard output, or to standard error when standard output
/// carries data. A closed pipe (`| head`) ends the program quietly instead of panicking.
pub(crate) fn out(text: &str) {
    use std::io::Write as _;
    let text = text.trim_end_matches('\n');
    if STDOUT_TAKEN.load(Ordering::Relaxed) {
        let _ = writeln!(std::io::stderr().lock(), "{text}");
        return;
    }
    let mut so = std::io::stdout().lock();
    if writeln!(so, "{text}").is_err() {
        std::process::exit(0);
    }
}

/// Print JSON of a typed result.
fn out_json<T: serde::Serialize>(v: &T) -> CliResult {
    out(&serde_json::to_string_pretty(v).map_err(|e| e.to_string())?);
    Ok(())
}

/// Read a design from a file, or from standard input for `-` (a relative kernel path is then
/// relative to the working folder).
fn read_design(path: &Path) -> Result<MissionDesign, CliError> {
    if is_dash(path) {
        let mut text = String::new();
        std::io::stdin()
            .take(files::MAX_FILE_BYTES + 1)
            .read_to_string(&mut text)
            .map_err(|e| format!("standard input: {e}"))?;
        return files::from_str(&text, Path::new("<standard input>"))
            .map_err(|e| e.to_string().into());
    }
    files::load(path).map_err(|e| e.to_string().into())
}

/// Read a design and apply the command line's ephemeris choice (validated again under it).
fn load_with(path: &Path, ephemeris: &EphemerisArg) -> Result<MissionDesign, CliError> {
    let mut d = read_design(path)?;
    if let Some(e) = &ephemeris.ephemeris {
        d.ephemeris = e.clone();
        files::validate(&d).map_err(|i| format!("{}: {i}", path.display()))?;
    }
    Ok(d)
}

fn prepare(path: &Path, d: &MissionDesign) -> Result<PreparedTour, CliError> {
    PreparedTour::prepare(d).map_err(|e| format!("{}: {e}", path.display()).into())
}

/// True when `a` and `b` name the same existing file (through links and relative paths).
fn same_file(a: &Path, b: &Path) -> bool {
    if is_dash(a) || is_dash(b) {
        return false;
    }
    match (std::fs::canonicalize(a), std::fs::canonicalize(b)) {
        (Ok(x), Ok(y)) => x == y,
        _ => false,
    }
}

/// What an output path receives.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
enum Writes {
    /// A design (replacing an input only with `--in-place`).
    Design {
        /// `--in-place` was given.
        in_place: bool,
    },
    /// Data (a table, a trajectory): never over an input, never over a design file.
    Data,
}

/// Check that `output` (named by `flag`) may be written given the command's `inputs`.
fn check_output(output: &Path, inputs: &[&Path], what: Writes, flag: &str) -> CliResult {
    if is_dash(output) {
        return Ok(());
    }
    for i in inputs {
        if same_file(i, output) && what != (Writes::Design { in_place: true }) {
            return Err(match what {
                Writes::Design { .. } => format!(
                    "{flag} {} is the input file; write elsewhere, or pass --in-place to replace it",
                    output.display()
                ),
                Writes::Data => format!(
                    "{flag} {} is an input file; an export never replaces its input",
                    output.display()
                ),
            }
            .into());
        }
    }
    if what == Writes::Data && files::holds_design(output) {
        return Err(format!(
            "{flag} {} holds a design; an export never replaces a design file",
            output.display()
        )
        .into());
    }
    Ok(())
}

/// Write data to a path (`-`: standard output) after [`check_output`]: atomically, through
/// symbolic links, never onto a special file.
fn write(path: &Path, text: &str) -> CliResult {
    if is_dash(path) {
        use std::io::Write as _;
        let mut so = std::io::stdout().lock();
        if so
            .write_all(text.as_bytes())
            .and_then(|_| so.flush())
            .is_err()
        {
            std::process::exit(0);
        }
        return Ok(());
    }
    files::write_atomic(path, text.as_bytes()).map_err(|e| e.to_string().into())
}

/// Save a design to a path (`-`: standard output).
fn save_design(d: &MissionDesign, path: &Path) -> CliResult {
    if is_dash(path) {
        files::validate(d).map_err(|i| format!("-: {i}"))?;
        return write(path, &files::to_string(d));
    }
    files::save(d, path).map_err(|e| e.to_string().into())
}

fn range(text: &str, what: &str) -> Result<(String, String), CliError> {
    text.split_once("..")
        .map(|(a, b)| (a.trim().to_string(), b.trim().to_string()))
        .ok_or_else(|| format!("--{what} wants START..END, got '{text}'").into())
}

fn epochs(text: &str, what: &str) -> Result<(Epoch, Epoch), CliError> {
    let (a, b) = range(text, what)?;
    let a = Epoch::parse(&a).map_err(|e| format!("--{what}: {e}"))?;
    let b = Epoch::parse(&b).map_err(|e| format!("--{what}: {e}"))?;
    if b.tdb().0 <= a.tdb().0 {
        return Err(format!("--{what}: the end must be after the start").into());
    }
    Ok((a, b))
}

/// The clap command, for completions and manual pages.
pub fn command() -> clap::Command {
    <Cli as clap::CommandFactory>::command()
}
