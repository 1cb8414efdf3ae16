//! `tourwright explore`: enumerate planet sequences, prune, optimise and rank them; or explore one
//! shard of a survey (`--shard K/N`, JSON lines) and rank the union of shards (`--merge`).

use std::path::{Path, PathBuf};

use tourwright_astro::bodies::Planet;
use tourwright_mission::design::EphemerisChoice;
use tourwright_mission::{MissionDesign, files};
use tourwright_search::Progress;
use tourwright_search::explore::{self, Exploration, ExploreSpec};

use super::{CliResult, ObjectiveArg, epochs, write};

/// The arguments of `explore`.
pub struct Args {
    /// Launch body.
    pub from: Option<String>,
    /// Ephemeris model.
    pub ephemeris: Option<EphemerisChoice>,
    /// Target body.
    pub to: Option<String>,
    /// Launch period.
    pub launch: Option<String>,
    /// Swing-by bodies.
    pub via: String,
    /// Largest number of swing-bys.
    pub max_swingbys: usize,
    /// Largest TOF, years.
    pub max_tof_years: f64,
    /// Objective.
    pub objective: ObjectiveArg,
    /// Largest C3.
    pub max_c3: Option<f64>,
    /// Evaluations per sequence.
    pub evals: u64,
    /// Seed.
    pub seed: u64,
    /// Share K/N.
    pub shard: Option<String>,
    /// Which legs get a manoeuvre.
    pub dsm: DsmArg,
    /// JSON-lines output of a shard.
    pub jsonl: Option<PathBuf>,
    /// Folders or files of shards to merge.
    pub merge: Vec<PathBuf>,
    /// Folder for ranked designs.
    pub out: Option<PathBuf>,
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
pub fn parse_shard(s: &str) -> Result<(usize, usize), String> {
    let bad = || format!("--shard wants K/N with 1 ≤ K ≤ N, got '{s}'");
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
    if !a.merge.is_empty() {
        let ex = merge(&a.merge)?;
        print_table(&ex);
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
    if let Some(e) = a.ephemeris {
        template.ephemeris = e;
    }
    let ex = explore::explore(&spec, &template, &Progress::new());
    if spec.shard.is_some() {
        let lines = ex.to_json_lines();
        match &a.jsonl {
            Some(p) => write(p, &lines)?,
            None => super::out(&lines),
        }
        return Ok(());
    }
    print_table(&ex);
    save_designs(&ex, a.out.as_deref())
}

/// Read every `*.jsonl` in the folders (or the files) given and rank the union.
fn merge(paths: &[PathBuf]) -> Result<Exploration, String> {
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
}

fn print_table(ex: &Exploration) {
    super::out(&format!(
        "{} sequences enumerated, {} pruned, {} optimised",
        ex.enumerated,
        ex.pruned.len(),
        ex.ranked.len()
    ));
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
