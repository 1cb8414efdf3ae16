//! The command line: the same engine for scripts and batch work. This module is the argument
//! schema and the helpers every subcommand shares; each subcommand has a module of its own. Every
//! command prints tables or writes files; bad input ends with a one-line reason on stderr and a
//! non-zero exit status.

mod compare;
mod dsm;
mod eval;
mod explore;
mod export;
mod fidelity;
mod optimize;
mod retarget;
mod state;
mod tisserand;
mod window;

use std::path::{Path, PathBuf};

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

/// Subcommands.
#[derive(Subcommand, Debug)]
pub enum Command {
    /// Open the workbench (optionally on a design file).
    Gui {
        /// Design file to open.
        file: Option<PathBuf>,
    },
    /// Evaluate a design: event table and ledger.
    Eval {
        /// Design file.
        file: PathBuf,
        /// Ephemeris model: mean-elements (JPL approximate elements 1800-2050), mga-benchmark
        /// (the MGA benchmark set's analytic model), kernel:PATH (a JPL SPK kernel such as
        /// de421.bsp) or kernel (the default kernel, TOURWRIGHT_KERNEL); default: the design's.
        #[arg(long, value_parser = EphemerisChoice::parse)]
        ephemeris: Option<EphemerisChoice>,
        /// Machine-readable JSON instead of text.
        #[arg(long)]
        json: bool,
    },
    /// Heliocentric ecliptic J2000 states of a planet from an ephemeris source (km, km/s).
    State {
        /// Planet (name or letter).
        body: String,
        /// Epoch, or START..END with --step.
        #[arg(long)]
        at: String,
        /// Step between rows for a range, days.
        #[arg(long)]
        step: Option<f64>,
        /// Ephemeris model: mean-elements (JPL approximate elements 1800-2050), mga-benchmark
        /// (the MGA benchmark set's analytic model), kernel:PATH (a JPL SPK kernel such as
        /// de421.bsp) or kernel (the default kernel, TOURWRIGHT_KERNEL); default: mean-elements.
        #[arg(long, value_parser = EphemerisChoice::parse)]
        ephemeris: Option<EphemerisChoice>,
        /// Write CSV here instead of printing.
        #[arg(long)]
        csv: Option<PathBuf>,
    },
    /// Tisserand graph: v∞ contours of planets on (periapsis, apoapsis) radius, and a design's
    /// arcs on them, as CSV.
    Tisserand {
        /// Planets, comma-separated letters or names (V,E,J).
        #[arg(long)]
        bodies: String,
        /// v∞ levels, km/s, comma-separated (3,5,7,9).
        #[arg(long)]
        vinf: String,
        /// A design whose arcs are added as rows ("design leg K").
        #[arg(long)]
        design: Option<PathBuf>,
        /// Ephemeris model: mean-elements (JPL approximate elements 1800-2050), mga-benchmark
        /// (the MGA benchmark set's analytic model), kernel:PATH (a JPL SPK kernel such as
        /// de421.bsp) or kernel (the default kernel, TOURWRIGHT_KERNEL); default: the design's.
        #[arg(long, value_parser = EphemerisChoice::parse)]
        ephemeris: Option<EphemerisChoice>,
        /// Write CSV here instead of printing.
        #[arg(long)]
        csv: Option<PathBuf>,
    },
    /// n-body check of a design: per encounter the miss, its B-plane components, the change in
    /// v∞ and the departure correction that removes the miss.
    Fidelity {
        /// Design file.
        file: PathBuf,
        /// Ephemeris model: mean-elements (JPL approximate elements 1800-2050), mga-benchmark
        /// (the MGA benchmark set's analytic model), kernel:PATH (a JPL SPK kernel such as
        /// de421.bsp) or kernel (the default kernel, TOURWRIGHT_KERNEL); default: the design's.
        #[arg(long, value_parser = EphemerisChoice::parse)]
        ephemeris: Option<EphemerisChoice>,
        /// Machine-readable JSON instead of text.
        #[arg(long)]
        json: bool,
    },
    /// Compare the tour with the best direct transfer in the launch period.
    Compare {
        /// Design file.
        file: PathBuf,
        /// Ephemeris model: mean-elements (JPL approximate elements 1800-2050), mga-benchmark
        /// (the MGA benchmark set's analytic model), kernel:PATH (a JPL SPK kernel such as
        /// de421.bsp) or kernel (the default kernel, TOURWRIGHT_KERNEL); default: the design's.
        #[arg(long, value_parser = EphemerisChoice::parse)]
        ephemeris: Option<EphemerisChoice>,
        /// Ranking measure (default: mass when the design has a launch vehicle, else dv).
        #[arg(long, value_enum)]
        measure: Option<ObjectiveArg>,
        /// Half-width of the launch period around the tour's launch, days.
        #[arg(long, default_value_t = 365.25)]
        window_days: f64,
        /// Machine-readable JSON instead of text.
        #[arg(long)]
        json: bool,
    },
    /// Export tables or the trajectory.
    Export {
        /// Design file.
        file: PathBuf,
        /// Event table as CSV.
        #[arg(long)]
        csv: Option<PathBuf>,
        /// Ledger as CSV.
        #[arg(long)]
        ledger: Option<PathBuf>,
        /// Trajectory samples as CSV.
        #[arg(long)]
        samples: Option<PathBuf>,
        /// Trajectory as a CCSDS OEM (KVN).
        #[arg(long)]
        oem: Option<PathBuf>,
    },
    /// Window map (porkchop grid) between two bodies or for one leg of a design.
    Window {
        /// Departure body (or take it from --design and --leg).
        #[arg(long)]
        from: Option<String>,
        /// Ephemeris model: mean-elements (JPL approximate elements 1800-2050), mga-benchmark
        /// (the MGA benchmark set's analytic model), kernel:PATH (a JPL SPK kernel such as
        /// de421.bsp) or kernel (the default kernel, TOURWRIGHT_KERNEL); default: the design's.
        #[arg(long, value_parser = EphemerisChoice::parse)]
        ephemeris: Option<EphemerisChoice>,
        /// Arrival body.
        #[arg(long)]
        to: Option<String>,
        /// Design whose leg to map (its dates centre the map unless given).
        #[arg(long)]
        design: Option<PathBuf>,
        /// Leg number (1-based) of --design.
        #[arg(long, default_value_t = 1)]
        leg: usize,
        /// Departure dates START..END.
        #[arg(long)]
        depart: Option<String>,
        /// Arrival dates START..END.
        #[arg(long)]
        arrive: Option<String>,
        /// Time of flight range MIN..MAX in days (instead of --arrive).
        #[arg(long)]
        tof: Option<String>,
        /// Cells per axis.
        #[arg(long, default_value_t = 200)]
        steps: usize,
        /// Complete revolutions of the arcs.
        #[arg(long, default_value_t = 0)]
        revs: u32,
        /// Multi-revolution branch (left: smaller x, right: larger x).
        #[arg(long, value_enum, default_value = "left")]
        branch: BranchArg,
        /// Write the grid as CSV.
        #[arg(long)]
        csv: Option<PathBuf>,
    },
    /// Adjust a shaped swing-by so that its ballistic leg meets the next body again.
    Retarget {
        /// Design file.
        file: PathBuf,
        /// Ephemeris model: mean-elements (JPL approximate elements 1800-2050), mga-benchmark
        /// (the MGA benchmark set's analytic model), kernel:PATH (a JPL SPK kernel such as
        /// de421.bsp) or kernel (the default kernel, TOURWRIGHT_KERNEL); default: the design's.
        #[arg(long, value_parser = EphemerisChoice::parse)]
        ephemeris: Option<EphemerisChoice>,
        /// Stop number (1-based) of the shaped swing-by.
        #[arg(long)]
        stop: usize,
        /// Also move the next stop's epoch (and later ones by the same shift).
        #[arg(long)]
        move_epoch: bool,
        /// Where to write the adjusted design.
        #[arg(long)]
        out: PathBuf,
    },
    /// Add, move or remove a leg's deep-space manoeuvre (DSM).
    Dsm {
        /// Design file.
        file: PathBuf,
        /// Leg number (1-based: leg 1 runs from stop 1 to stop 2).
        #[arg(long)]
        leg: usize,
        /// Place the manoeuvre at this fraction of the leg's time of flight (0 < F < 1).
        #[arg(long, conflicts_with_all = ["date", "remove"])]
        at: Option<f64>,
        /// Place the manoeuvre on this date (inside the leg), e.g. 2031-05-01 or
        /// 2031-05-01T12:00:00 TDB.
        #[arg(long, conflicts_with = "remove")]
        date: Option<String>,
        /// Remove the leg's manoeuvre.
        #[arg(long)]
        remove: bool,
        /// Where to write the changed design.
        #[arg(long)]
        out: PathBuf,
    },
    /// Optimise a design's dates within its search bounds.
    Optimize {
        /// Design file.
        file: PathBuf,
        /// Ephemeris model: mean-elements (JPL approximate elements 1800-2050), mga-benchmark
        /// (the MGA benchmark set's analytic model), kernel:PATH (a JPL SPK kernel such as
        /// de421.bsp) or kernel (the default kernel, TOURWRIGHT_KERNEL); default: the design's.
        #[arg(long, value_parser = EphemerisChoice::parse)]
        ephemeris: Option<EphemerisChoice>,
        /// Seed (the same seed and budget give the same answer).
        #[arg(long, default_value_t = 1)]
        seed: u64,
        /// Wall-clock limit, seconds (optional; results then depend on machine speed).
        #[arg(long)]
        time: Option<f64>,
        /// Evaluation budget (default 400 000; with --time and no --evals, the time alone).
        #[arg(long)]
        evals: Option<u64>,
        /// Objective (default: the design's).
        #[arg(long, value_enum)]
        objective: Option<ObjectiveArg>,
        /// Where to write the improved design (not the input file, unless --in-place).
        #[arg(long)]
        out: PathBuf,
        /// Allow --out to name the input file and replace it.
        #[arg(long)]
        in_place: bool,
        /// Also write the TOF trade-off front as CSV.
        #[arg(long)]
        front: Option<PathBuf>,
    },
    /// Explore planet sequences and rank them (or merge the shards of a survey).
    Explore {
        /// Launch body.
        #[arg(long, required_unless_present = "merge")]
        from: Option<String>,
        /// Target body.
        #[arg(long, required_unless_present = "merge")]
        to: Option<String>,
        /// Launch period START..END.
        #[arg(long, required_unless_present = "merge")]
        launch: Option<String>,
        /// Bodies allowed for swing-bys, comma-separated letters or names (V,E,M,J).
        #[arg(long, default_value = "V,E,M,J")]
        via: String,
        /// Largest number of swing-bys.
        #[arg(long, default_value_t = 2)]
        max_swingbys: usize,
        /// Largest total TOF, years.
        #[arg(long, default_value_t = 8.0)]
        max_tof_years: f64,
        /// Objective.
        #[arg(long, value_enum, default_value = "dv")]
        objective: ObjectiveArg,
        /// Largest launch C3, km²/s².
        #[arg(long)]
        max_c3: Option<f64>,
        /// Evaluations per sequence.
        #[arg(long, default_value_t = tourwright_search::explore::DEFAULT_EVALS_PER_SEQUENCE)]
        evals: u64,
        /// Seed.
        #[arg(long, default_value_t = 1)]
        seed: u64,
        /// Ephemeris model: mean-elements (JPL approximate elements 1800-2050), mga-benchmark
        /// (the MGA benchmark set's analytic model), kernel:PATH (a JPL SPK kernel) or kernel
        /// (TOURWRIGHT_KERNEL); default: mean-elements.
        #[arg(long, value_parser = EphemerisChoice::parse)]
        ephemeris: Option<EphemerisChoice>,
        /// Deep-space manoeuvres on explored legs (MGA-1DSM): none, resonant (legs that return
        /// to the body they left, the default) or every.
        #[arg(long, value_enum, default_value = "resonant")]
        dsm: explore::DsmArg,
        /// Explore only share K of N (1-based K), e.g. 3/16: for array jobs of a scheduler.
        /// Writes JSON lines to --jsonl (or to standard output).
        #[arg(long)]
        shard: Option<String>,
        /// Where a shard writes its JSON lines.
        #[arg(long)]
        jsonl: Option<PathBuf>,
        /// Rank the union of shards: folders (or files) of JSON lines written by --shard.
        #[arg(long, num_args = 1.., conflicts_with_all = ["from", "to", "launch", "shard"])]
        merge: Vec<PathBuf>,
        /// Folder for the ranked designs (one file per sequence).
        #[arg(long)]
        out: Option<PathBuf>,
    },
}

/// A failure of a command: one line for stderr (empty when the command already said everything on
/// standard output) and the exit status.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct CliError {
    /// The line for stderr.
    pub message: String,
    /// Exit status: 1 for bad input or a failure, 3 when a search found no design meeting every
    /// limit.
    pub status: i32,
}

/// Exit status of a search that found no design meeting every limit.
pub const EXIT_NO_FEASIBLE: i32 = 3;

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
pub fn run(cmd: Command) -> CliResult {
    match cmd {
        Command::Gui { .. } => Err("the workbench is started by the binary".into()),
        Command::Eval {
            file,
            ephemeris,
            json,
        } => eval::run(&file, ephemeris, json),
        Command::Compare {
            file,
            ephemeris,
            measure,
            window_days,
            json,
        } => compare::run(&file, ephemeris, measure, window_days, json),
        Command::Export {
            file,
            csv,
            ledger,
            samples,
            oem,
        } => export::run(&file, csv, ledger, samples, oem),
        Command::Window {
            from,
            ephemeris,
            to,
            design,
            leg,
            depart,
            arrive,
            tof,
            steps,
            revs,
            branch,
            csv,
        } => window::run(window::Args {
            from,
            ephemeris,
            to,
            design,
            leg,
            depart,
            arrive,
            tof,
            steps,
            revs,
            branch,
            csv,
        }),
        Command::State {
            body,
            at,
            step,
            ephemeris,
            csv,
        } => state::run(&body, &at, step, ephemeris, csv.as_deref()),
        Command::Tisserand {
            bodies,
            vinf,
            design,
            ephemeris,
            csv,
        } => tisserand::run(&bodies, &vinf, design.as_deref(), ephemeris, csv.as_deref()),
        Command::Fidelity {
            file,
            ephemeris,
            json,
        } => fidelity::run(&file, ephemeris, json),
        Command::Retarget {
            file,
            ephemeris,
            stop,
            move_epoch,
            out,
        } => retarget::run(&file, ephemeris, stop, move_epoch, &out),
        Command::Dsm {
            file,
            leg,
            at,
            date,
            remove,
            out,
        } => dsm::run(&file, leg, at, date.as_deref(), remove, &out),
        Command::Optimize {
            file,
            ephemeris,
            seed,
            time,
            evals,
            objective,
            out,
            in_place,
            front,
        } => optimize::run(
            &file, ephemeris, seed, time, evals, objective, &out, in_place, front,
        ),
        Command::Explore {
            from,
            ephemeris,
            to,
            launch,
            via,
            max_swingbys,
            max_tof_years,
            objective,
            max_c3,
            evals,
            seed,
            out,
            dsm,
            shard,
            jsonl,
            merge,
        } => explore::run(explore::Args {
            from,
            ephemeris,
            to,
            launch,
            via,
            max_swingbys,
            max_tof_years,
            objective,
            max_c3,
            evals,
            seed,
            shard,
            dsm,
            jsonl,
            merge,
            out,
        }),
    }
}

fn load(path: &Path) -> Result<MissionDesign, String> {
    files::load(path).map_err(|e| e.to_string())
}

/// Load a design and apply the command line's ephemeris choice (validated again under it).
fn load_with(path: &Path, ephemeris: Option<EphemerisChoice>) -> Result<MissionDesign, String> {
    let mut d = load(path)?;
    if let Some(e) = ephemeris {
        d.ephemeris = e;
        files::validate(&d).map_err(|i| format!("{}: {i}", path.display()))?;
    }
    Ok(d)
}

fn prepare(path: &Path, d: &MissionDesign) -> Result<PreparedTour, String> {
    PreparedTour::prepare(d).map_err(|e| format!("{}: {e}", path.display()))
}

/// Print a line to standard output; a closed pipe (`| head`) ends the program quietly instead of
/// panicking.
pub(crate) fn out(text: &str) {
    use std::io::Write as _;
    let mut so = std::io::stdout().lock();
    if writeln!(so, "{}", text.trim_end_matches('\n')).is_err() {
        std::process::exit(0);
    }
}

/// True when `a` and `b` name the same existing file (through links and relative paths).
fn same_file(a: &Path, b: &Path) -> bool {
    match (std::fs::canonicalize(a), std::fs::canonicalize(b)) {
        (Ok(x), Ok(y)) => x == y,
        _ => false,
    }
}

/// Refuse to write `output` when it is the command's `input` (unless `allowed`): a command never
/// writes over what it reads without being asked.
fn refuse_overwrite(input: &Path, output: &Path, allowed: bool, flag: &str) -> CliResult {
    if !allowed && same_file(input, output) {
        return Err(format!(
            "{flag} {} is the input file; write elsewhere, or pass --in-place to replace it",
            output.display()
        )
        .into());
    }
    Ok(())
}

fn write(path: &Path, text: &str) -> CliResult {
    std::fs::write(path, text).map_err(|e| format!("{}: {e}", path.display()).into())
}

fn range(text: &str, what: &str) -> Result<(String, String), String> {
    text.split_once("..")
        .map(|(a, b)| (a.trim().to_string(), b.trim().to_string()))
        .ok_or_else(|| format!("--{what} wants START..END, got '{text}'"))
}

fn epochs(text: &str, what: &str) -> Result<(Epoch, Epoch), String> {
    let (a, b) = range(text, what)?;
    let a = Epoch::parse(&a).map_err(|e| format!("--{what}: {e}"))?;
    let b = Epoch::parse(&b).map_err(|e| format!("--{what}: {e}"))?;
    if b.tdb().0 <= a.tdb().0 {
        return Err(format!("--{what}: the end must be after the start"));
    }
    Ok((a, b))
}
