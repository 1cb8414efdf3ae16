//! `tourwright explore`: enumerate planet sequences, prune, optimise and rank them; or explore one
//! shard of a survey (`--shard K/N`, JSON lines) and rank the union of shards (`--merge`).

use std::path::{Path, PathBuf};

use tourwright_astro::bodies::Planet;
use tourwright_mission::{MissionDesign, files};
use tourwright_search::Progress;
use tourwright_search::explore::{self, DEFAULT_EVALS_PER_SEQUENCE, Exploration, ExploreSpec};

use super::progress::{interrupted, watch};
use super::{
    CliError, CliResult, EXIT_INTERRUPTED, EphemerisArg, ObjectiveArg, claim_stdout, epochs, out,
    out_json, write,
};

/// The arguments of `explore`.
#[derive(clap::Args, Debug)]
pub struct Args {
    /// Launch body.
    #[arg(long, required_unless_present = "merge")]
    pub from: Option<String>,
    /// Target body.
    #[arg(long, required_unless_present = "merge")]
    pub to: Option<String>,
    /// Launch period START..END.
    #[arg(long, required_unless_present = "merge")]
    pub launch: Option<String>,
    /// Bodies allowed for swing-bys, comma-separated letters or names (V,E,M,J).
    #[arg(long, default_value = "V,E,M,J")]
    pub via: String,
    /// Largest number of swing-bys.
    #[arg(long, default_value_t = 2)]
    pub max_swingbys: usize,
    /// Largest total TOF, years.
    #[arg(long, default_value_t = 8.0)]
    pub max_tof_years: f64,
    /// Objective.
    #[arg(long, value_enum, default_value = "dv")]
    pub objective: ObjectiveArg,
    /// Largest launch C3, km²/s².
    #[arg(long)]
    pub max_c3: Option<f64>,
    /// Evaluations per sequence.
    #[arg(long, default_value_t = DEFAULT_EVALS_PER_SEQUENCE)]
    pub evals: u64,
    /// Seed.
    #[arg(long, default_value_t = 1)]
    pub seed: u64,
    #[command(flatten)]
    pub eph: EphemerisArg,
    /// Deep-space manoeuvres on explored legs (MGA-1DSM): none, resonant (legs that return to
    /// the body they left, the default) or every.
    #[arg(long, value_enum, default_value = "resonant")]
    pub dsm: DsmArg,
    /// Explore only share K of N (1-based K), e.g. 3/16: for array jobs of a scheduler. Writes
    /// JSON lines to --jsonl (or to standard output).
    #[arg(long, conflicts_with = "merge")]
    pub shard: Option<String>,
    /// Where a shard writes its JSON lines (- for standard output).
    #[arg(long, requires = "shard")]
    pub jsonl: Option<PathBuf>,
    /// Rank the union of shards: folders (or files) of JSON lines written by --shard.
    #[arg(long, num_args = 1.., conflicts_with_all = ["from", "to", "launch", "shard"])]
    pub merge: Vec<PathBuf>,
    /// Folder for the ranked designs (one file per sequence).
    #[arg(long)]
    pub out: Option<PathBuf>,
    /// Machine-readable JSON of the ranking instead of the table.
    #[arg(long, conflicts_with = "shard")]
    pub json: bool,
}

/// Which legs of an explored sequence get a deep-space manoeuvre.
#[derive(Clone, Copy, Debug, clap::ValueEnum)]
pub enum DsmArg {
    /// No manoeuvres: Lambert legs and powered swing-bys within their limit.
    None,
    /// Legs that return to the body they left (Earth-Earth, Venus-Venus): v∞ leveraging.
    Resonant,
    /// Every leg (the swing-bys become unpowered and shaped).
    Every,
}

impl From<DsmArg> for explore::DsmPolicy {
    fn from(a: DsmArg) -> Self {
        match a {
            DsmArg::None => explore::DsmPolicy::None,
            DsmArg::Resonant => explore::DsmPolicy::Resonant,
            DsmArg::Every => explore::DsmPolicy::Every,
        }
    }
}

/// Read `K/N` (1-based K) into a 0-based share.
pub fn parse_shard(s: &str) -> Result<(usize, usize), CliError> {
    let bad = || CliError::from(format!("--shard wants K/N with 1 ≤ K ≤ N, got '{s}'"));
    let (k, n) = s.split_once('/').ok_or_else(bad)?;
    let k: usize = k.trim().parse().map_err(|_| bad())?;
    let n: usize = n.trim().parse().map_err(|_| bad())?;
    if k == 0 || k > n || n > 100_000 {
        return Err(bad());
    }
    Ok((k - 1, n))
}

/// Run `explore`.
pub fn run(a: Args) -> CliResult {
    claim_stdout(&[a.jsonl.as_deref()])?;
    if !a.merge.is_empty() {
        let ex = merge(&a.merge)?;
        report(&ex, a.json)?;
        return save_designs(&ex, a.out.as_deref());
    }
    let pl = |s: &str| Planet::from_name(s).ok_or_else(|| format!("unknown planet '{s}'"));
    let mut via = Vec::new();
    for v in a.via.split(',').filter(|v| !v.trim().is_empty()) {
        via.push(pl(v)?);
    }
    if a.max_swingbys > 4 {
        return Err("--max-swingbys is limited to 4".into());
    }
    if !(a.max_tof_years.is_finite() && a.max_tof_years > 0.0 && a.max_tof_years <= 60.0) {
        return Err("--max-tof-years must be between 0 and 60".into());
    }
    if a.max_c3.is_some_and(|c| !(c.is_finite() && c >= 0.0)) {
        return Err("--max-c3 must be zero or positive".into());
    }
    let (from, to, launch) = match (&a.from, &a.to, &a.launch) {
        (Some(f), Some(t), Some(l)) => (f, t, l),
        _ => return Err("give --from, --to and --launch (or --merge)".into()),
    };
    let spec = ExploreSpec {
        from: pl(from)?,
        to: pl(to)?,
        launch: epochs(launch, "launch")?,
        via,
        max_swingbys: a.max_swingbys,
        max_tof_years: a.max_tof_years,
        objective: a.objective.into(),
        evals_per_sequence: a.evals,
        seed: a.seed,
        shard: a.shard.as_deref().map(parse_shard).transpose()?,
        dsm: a.dsm.into(),
        // The template's spacecraft is a blank one, not the designer's: masses are not limits.
        limits: tourwright_mission::LimitSet::TRAJECTORY,
    };
    let mut template = MissionDesign::new_blank();
    template.launch.max_c3_km2_s2 = a.max_c3;
    if let Some(e) = a.eph.ephemeris.clone() {
        template.ephemeris = e;
    }
    // A launch period the ephemeris does not cover cannot be explored at all: say so first.
    let model = tourwright_mission::tour::Catalog::of(&template)
        .map_err(|i| format!("--ephemeris: {}", i.reason))?
        .model()
        .clone();
    let (lo, hi) = model.range();
    if spec.launch.0.tdb().0 < lo.0 || spec.launch.1.tdb().0 > hi.0 {
        return Err(format!(
            "--launch {}: outside the range of {} ({} .. {})",
            a.launch.as_deref().unwrap_or(""),
            model.name(),
            lo.to_date_utc(),
            hi.to_date_utc()
        )
        .into());
    }
    let p = Progress::new();
    let w = watch(&p, "explorer");
    let ex = explore::explore(&spec, &template, &p);
    drop(w);
    if spec.shard.is_some() {
        if interrupted() {
            out("interrupted: the shard was stopped and nothing was written");
            return Err(CliError::status(EXIT_INTERRUPTED));
        }
        let lines = ex.to_json_lines();
        match &a.jsonl {
            Some(p) => write(p, &lines)?,
            None => write(Path::new("-"), &lines)?,
        }
        return Ok(());
    }
    report(&ex, a.json)?;
    save_designs(&ex, a.out.as_deref())?;
    if interrupted() {
        out("interrupted: the sequences optimised so far are ranked above");
        return Err(CliError::status(EXIT_INTERRUPTED));
    }
    Ok(())
}

/// One ranked sequence of `explore --json`.
#[derive(serde::Serialize)]
struct RankedReport<'a> {
    rank: usize,
    sequence: &'a str,
    launch_utc: String,
    tof_days: f64,
    c3_km2_s2: f64,
    dv_km_s: f64,
    delivered_mass_kg: Option<f64>,
    objective: &'static str,
    unit: &'static str,
    value: f64,
    meets_every_limit: bool,
    broken_limits: &'a [String],
}

/// A pruned sequence of `explore --json`.
#[derive(serde::Serialize)]
struct PrunedReport<'a> {
    sequence: &'a str,
    reason: &'a str,
}

/// `explore --json`.
#[derive(serde::Serialize)]
struct ExploreReport<'a> {
    enumerated: usize,
    pruned: Vec<PrunedReport<'a>>,
    ranked: Vec<RankedReport<'a>>,
}

fn report(ex: &Exploration, json: bool) -> CliResult {
    if !json {
        print_table(ex);
        return Ok(());
    }
    out_json(&ExploreReport {
        enumerated: ex.enumerated,
        pruned: ex
            .pruned
            .iter()
            .map(|(s, r)| PrunedReport {
                sequence: s,
                reason: r,
            })
            .collect(),
        ranked: ex
            .ranked
            .iter()
            .enumerate()
            .map(|(i, c)| RankedReport {
                rank: i + 1,
                sequence: &c.label,
                launch_utc: c.launch.to_date_utc(),
                tof_days: c.tof_days,
                c3_km2_s2: c.c3,
                dv_km_s: c.dv_km_s,
                delivered_mass_kg: c.delivered_kg,
                objective: c.objective.label(),
                unit: c.objective.unit(),
                value: c.objective.display_value(c.value),
                meets_every_limit: c.feasible,
                broken_limits: &c.breaches,
            })
            .collect(),
    })
}

/// Read every `*.jsonl` in the folders (or the files) given and rank the union.
fn merge(paths: &[PathBuf]) -> Result<Exploration, CliError> {
    let mut texts = Vec::new();
    for p in paths {
        if p.is_dir() {
            let mut files: Vec<PathBuf> = std::fs::read_dir(p)
                .map_err(|e| format!("{}: {e}", p.display()))?
                .filter_map(|e| e.ok().map(|e| e.path()))
                .filter(|f| f.extension().is_some_and(|x| x == "jsonl"))
                .collect();
            files.sort();
            for f in files {
                let t = std::fs::read_to_string(&f).map_err(|e| format!("{}: {e}", f.display()))?;
                texts.push((f.display().to_string(), t));
            }
        } else {
            let t = std::fs::read_to_string(p).map_err(|e| format!("{}: {e}", p.display()))?;
            texts.push((p.display().to_string(), t));
        }
    }
    if texts.is_empty() {
        return Err("--merge found no .jsonl files".into());
    }
    Exploration::merge_json_lines(texts.iter().map(|(n, t)| (n.as_str(), t.as_str())))
        .map_err(CliError::from)
}

fn print_table(ex: &Exploration) {
    super::out(&format!(
        "{} sequences enumerated, {} pruned, {} optimised",
        ex.enumerated,
        ex.pruned.len(),
        ex.ranked.len()
    ));
    if ex.ranked.is_empty() {
        super::out("No sequence could be optimised (the reasons are below).");
    }
    let unit = ex.ranked.first().map(|c| c.objective.unit()).unwrap_or("");
    super::out(&format!(
        "{:<4} {:<14} {:<11} {:>9} {:>9} {:>9} {:>12} limits",
        "rank",
        "sequence",
        "launch",
        "TOF (d)",
        "C3",
        "Δv",
        format!("obj. ({unit})")
    ));
    for (i, c) in ex.ranked.iter().enumerate() {
        let limits = if c.feasible {
            "met".to_string()
        } else {
            format!("broken: {}", c.breaches.join("; "))
        };
        super::out(&format!(
            "{:<4} {:<14} {:<11} {:>9.0} {:>9.2} {:>9.3} {:>12.4} {limits}",
            i + 1,
            c.label,
            c.launch.to_date_utc(),
            c.tof_days,
            c.c3,
            c.dv_km_s,
            c.objective.display_value(c.value),
        ));
    }
    if !ex.pruned.is_empty() {
        super::out(&format!("pruned ({}):", ex.pruned.len()));
        for (s, why) in &ex.pruned {
            super::out(&format!("  {s}: {why}"));
        }
    }
    super::out(
        "Limits: swing-by altitude, v∞ and powered Δv, launch C3 and the total TOF; the \
         spacecraft's masses are not checked (the explorer starts from a blank design).",
    );
}

fn save_designs(ex: &Exploration, out: Option<&Path>) -> CliResult {
    if let Some(dir) = out {
        std::fs::create_dir_all(dir).map_err(|e| format!("{}: {e}", dir.display()))?;
        for (i, c) in ex.ranked.iter().enumerate() {
            let p = dir.join(format!("{:02}-{}.tour.ron", i + 1, c.label));
            files::save(&c.design, &p).map_err(|e| e.to_string())?;
        }
    }
    Ok(())
}
