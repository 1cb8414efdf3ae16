//! The sequence explorer: enumerate planet sequences from a launch body to a target, prune the
//! hopeless ones cheaply, optimise each survivor's dates within a budget and rank them.
//!
//! Pruning (cheap and conservative, from energy alone): reaching body B's orbit from body A's needs
//! at least the Hohmann v∞ at A; and leaving A with v∞ ≤ u, the heliocentric speed is at most
//! V_A + u, so energy conservation bounds the speed at B and hence v∞ at B by
//! √((V_A + u)² + 2μ☉(1/r_B − 1/r_A)) + V_B (circular mean orbits). Starting from the launch v∞
//! that the C3 limit allows, a sequence is dropped when some leg needs more v∞ than that bound
//! (plus 1 km/s for eccentric and inclined orbits and 1 km/s of powered swing-by per stop), or when
//! even flying every leg's radial distance at that bounding speed takes longer than the TOF limit
//! (a lower bound on any leg's time; a Hohmann time would wrongly drop fast tours such as a
//! 1977 Jupiter-Saturn passage). Repeated bodies (V-V, E-E) are resonant legs whose revolutions
//! the optimiser chooses.

use std::sync::Arc;

use tourwright_astro::bodies::Planet;
use tourwright_astro::ephemeris::MeanElements;
use tourwright_astro::time::Epoch;
use tourwright_astro::transfer::hohmann;
use tourwright_mission::design::{
    Dsm, LaunchVinf, LegOptions, MissionDesign, SearchBounds, Stop, SwingbyMode, TofBounds,
};
use tourwright_mission::evaluate::evaluate_design;
use tourwright_mission::{LimitSet, Objective};

use crate::job::Progress;
use crate::optimize::{OptimizeOptions, search_design};

/// Default optimiser evaluations per explored sequence (CLI and workbench). Measured on flown
/// tours (DEVELOPERS.md): with a manoeuvre on resonant legs, 60 000 finds Galileo's 1989
/// E-V-E-E-J launch 16 days from its flown date and 200 000 one day from it; 150 000 keeps a
/// three-swing-by survey of two bodies to a few seconds.
pub const DEFAULT_EVALS_PER_SEQUENCE: u64 = 150_000;

/// What to explore.
#[derive(Clone, Debug, PartialEq)]
pub struct ExploreSpec {
    /// Launch body.
    pub from: Planet,
    /// Target body.
    pub to: Planet,
    /// Launch period.
    pub launch: (Epoch, Epoch),
    /// Bodies allowed for swing-bys.
    pub via: Vec<Planet>,
    /// Largest number of swing-bys.
    pub max_swingbys: usize,
    /// Largest total time of flight, years.
    pub max_tof_years: f64,
    /// Objective for ranking.
    pub objective: Objective,
    /// Optimiser evaluations per surviving sequence.
    pub evals_per_sequence: u64,
    /// Seed.
    pub seed: u64,
    /// Explore only share `k` of `n` (0-based `k`): the sequences whose place in the enumeration
    /// is `k` modulo `n`. Shards of one survey together cover it exactly once.
    pub shard: Option<(usize, usize)>,
    /// Which legs get a deep-space manoeuvre.
    pub dsm: DsmPolicy,
    /// Which limits a tour must meet to rank as feasible (the spacecraft's masses only when
    /// the template's spacecraft is the designer's).
    pub limits: LimitSet,
}

/// Which legs of an explored sequence carry a deep-space manoeuvre (MGA-1DSM legs: the swing-by
/// before such a leg is unpowered and shaped, its altitude and aim searched).
#[derive(Clone, Copy, Debug, PartialEq, Eq, Default, serde::Serialize, serde::Deserialize)]
pub enum DsmPolicy {
    /// None: Lambert legs, powered swing-bys within their limit.
    None,
    /// Legs that return to the body they left (Earth-Earth, Venus-Venus): v∞ leveraging. The
    /// default: without it the v∞-leveraging tours flown to Jupiter rank with the wrong launch
    /// dates (DEVELOPERS.md).
    #[default]
    Resonant,
    /// Every leg.
    Every,
}

impl DsmPolicy {
    /// Every policy with its command-line name and its words.
    pub const ALL: [(DsmPolicy, &'static str, &'static str); 3] = [
        (DsmPolicy::None, "none", "no manoeuvres"),
        (DsmPolicy::Resonant, "resonant", "on resonant legs"),
        (DsmPolicy::Every, "every", "on every leg"),
    ];

    /// True when leg `k` of `seq` gets a manoeuvre.
    pub fn applies(self, seq: &[Planet], k: usize) -> bool {
        match self {
            DsmPolicy::None => false,
            DsmPolicy::Resonant => seq.get(k) == seq.get(k + 1),
            DsmPolicy::Every => true,
        }
    }
}

/// One ranked sequence.
#[derive(Clone, Debug, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct Candidate {
    /// The sequence, e.g. `E-V-E-J`.
    pub label: String,
    /// The optimised design.
    pub design: MissionDesign,
    /// The objective exactly as `eval` computes it (smaller is better; delivered mass negated).
    pub value: f64,
    /// The objective the value measures.
    #[serde(default)]
    pub objective: Objective,
    /// Launch epoch.
    pub launch: Epoch,
    /// Total TOF, days.
    pub tof_days: f64,
    /// Launch C3, km²/s².
    pub c3: f64,
    /// Spacecraft Δv, km/s.
    pub dv_km_s: f64,
    /// Delivered mass with the launch vehicle, kg.
    pub delivered_kg: Option<f64>,
    /// True when the design breaks no limit.
    pub feasible: bool,
    /// Each broken limit in words, with by how much (empty when feasible).
    #[serde(default)]
    pub breaches: Vec<String>,
}

/// Result of an exploration.
#[derive(Clone, Debug, Default, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct Exploration {
    /// Sequences enumerated.
    pub enumerated: usize,
    /// Sequences pruned, with the reason.
    pub pruned: Vec<(String, String)>,
    /// Optimised sequences, best first.
    pub ranked: Vec<Candidate>,
}

fn label(seq: &[Planet]) -> String {
    seq.iter().map(|p| p.letter()).collect::<Vec<_>>().join("-")
}

fn mean_a(p: Planet) -> f64 {
    MeanElements::of(p).a_km()
}

/// Leg TOF bounds (days) between two bodies: 0.15 to 2.2 Hohmann times (fast hyperbolic legs
/// between the giants take a fifth of a Hohmann time); legs that return to the
/// body they left 0.6 to 3.1 of its periods (the optimiser chooses their revolutions: the 1:1, 2:1
/// and 3:1 returns and the arcs between them).
pub fn leg_bounds(a: Planet, b: Planet) -> TofBounds {
    if a == b {
        let p = MeanElements::of(a).period_days();
        TofBounds {
            min_days: 0.6 * p,
            max_days: 3.1 * p,
        }
    } else {
        let h = hohmann(mean_a(a), mean_a(b)).tof_days;
        TofBounds {
            min_days: (0.15 * h).max(20.0),
            max_days: 2.2 * h,
        }
    }
}

/// Why a sequence is hopeless, or `None` when it may work.
pub fn prune_reason(
    seq: &[Planet],
    max_launch_vinf: f64,
    max_tof_days: f64,
) -> Option<&'static str> {
    use tourwright_astro::constants::MU_SUN;
    let h = |a: Planet, b: Planet| hohmann(mean_a(a), mean_a(b));
    let mut u = max_launch_vinf;
    let mut fastest_days = 0.0;
    for (k, w) in seq.windows(2).enumerate() {
        let (a, b) = (w[0], w[1]);
        if a == b {
            continue;
        }
        if h(a, b).vinf_depart > u + 1.0 {
            return Some(if k == 0 {
                "launch energy cannot reach the first body"
            } else {
                "the v∞ available cannot reach the next body"
            });
        }
        let (ra, rb) = (mean_a(a), mean_a(b));
        let (va, vb) = ((MU_SUN / ra).sqrt(), (MU_SUN / rb).sqrt());
        let vmax = va + u;
        fastest_days += (rb - ra).abs() / vmax / 86_400.0;
        let s2 = vmax.powi(2) + 2.0 * MU_SUN * (1.0 / rb - 1.0 / ra);
        u = s2.max(0.0).sqrt() + vb + 1.0;
    }
    if fastest_days > max_tof_days {
        return Some("too slow for the TOF limit");
    }
    None
}

/// Every sequence launch, up to `max_swingbys` of the `via` bodies, target.
pub fn enumerate(spec: &ExploreSpec) -> Vec<Vec<Planet>> {
    let mut out = vec![vec![spec.from, spec.to]];
    let mut frontier: Vec<Vec<Planet>> = vec![vec![]];
    for _ in 0..spec.max_swingbys {
        let mut next = Vec::new();
        for mid in &frontier {
            for &v in &spec.via {
                // No body three times in a row; no swing-by of the target just before arrival.
                let n = mid.len();
                if n >= 2 && mid[n - 1] == v && mid[n - 2] == v {
                    continue;
                }
                let mut m = mid.clone();
                m.push(v);
                let mut seq = vec![spec.from];
                seq.extend(&m);
                seq.push(spec.to);
                if seq[seq.len() - 2] != spec.to {
                    out.push(seq);
                }
                next.push(m);
            }
        }
        frontier = next;
    }
    out
}

/// Build the starting design for a sequence: nominal legs at the middle of their bounds. The
/// template gives the spacecraft, the launch vehicle and the launch limits; its arrival goal
/// only when it arrives at the same body (a capture orbit about one planet means nothing about
/// another), else the tour flies by.
pub fn design_for(seq: &[Planet], spec: &ExploreSpec, template: &MissionDesign) -> MissionDesign {
    let mut d = template.clone();
    d.name = format!("{} explored", label(seq));
    let same_target = template
        .stops
        .last()
        .and_then(|s| Planet::from_name(&s.body))
        .is_some_and(|p| Some(&p) == seq.last());
    if !same_target {
        d.arrival = tourwright_mission::design::ArrivalGoal::FlybyOnly;
    }
    let (a, b) = (spec.launch.0, spec.launch.1);
    let mut t = a.plus_seconds(0.5 * (b.tdb().0 - a.tdb().0));
    d.stops = Vec::with_capacity(seq.len());
    d.legs.clear();
    let mut bounds = Vec::new();
    for (k, p) in seq.iter().enumerate() {
        if k > 0 {
            let b = leg_bounds(seq[k - 1], *p);
            t = t.plus_days(0.5 * (b.min_days + b.max_days));
            bounds.push(b);
            d.legs.push(LegOptions::default());
        }
        d.stops.push(Stop {
            body: p.name().into(),
            epoch: t,
            swingby: Default::default(),
        });
    }
    for k in 0..seq.len().saturating_sub(1) {
        if !spec.dsm.applies(seq, k) {
            continue;
        }
        let mut m = Dsm::at_fraction(0.5);
        if k == 0 {
            m.launch = Some(LaunchVinf {
                vinf_km_s: 3.0,
                rla_deg: 0.0,
                dla_deg: 0.0,
                min_vinf_km_s: None,
                max_vinf_km_s: None,
            });
        } else {
            d.stops[k].swingby.mode = SwingbyMode::Shaped {
                altitude_km: 1000.0,
                aim_deg: 0.0,
            };
        }
        d.legs[k].dsm = Some(m);
    }
    d.search = SearchBounds {
        launch_earliest: Some(spec.launch.0),
        launch_latest: Some(spec.launch.1),
        leg_tof: bounds,
        max_total_tof_days: Some(spec.max_tof_years * 365.25),
        objective: spec.objective,
        resonant_revolutions: true,
    };
    d
}

/// Run the exploration. Sequences are optimised one after another (each on all cores);
/// cancelling `progress` stops the inner optimiser too.
pub fn explore(
    spec: &ExploreSpec,
    template: &MissionDesign,
    progress: &Arc<Progress>,
) -> Exploration {
    let max_vinf = template.launch.max_c3_km2_s2.map(f64::sqrt).unwrap_or(10.0);
    let max_tof = spec.max_tof_years * 365.25;
    let seqs = enumerate(spec);
    let mut ex = Exploration::default();
    let mut survivors = Vec::new();
    for (i, s) in seqs.into_iter().enumerate() {
        if let Some((k, n)) = spec.shard {
            if i % n.max(1) != k {
                continue;
            }
        }
        ex.enumerated += 1;
        match prune_reason(&s, max_vinf, max_tof) {
            Some(r) => ex.pruned.push((label(&s), r.to_string())),
            None => survivors.push(s),
        }
    }
    progress.set_total(survivors.len() as u64);
    for (i, s) in survivors.iter().enumerate() {
        if progress.is_cancelled() {
            break;
        }
        progress.set_message(format!(
            "optimising {} ({}/{})",
            label(s),
            i + 1,
            survivors.len()
        ));
        let d = design_for(s, spec, template);
        if let Err(e) = tourwright_mission::files::validate(&d) {
            ex.pruned
                .push((label(s), format!("the sequence cannot be searched: {e}")));
            continue;
        }
        let inner = progress.child();
        let outcome = search_design(
            &d,
            &OptimizeOptions {
                seed: spec.seed,
                max_evals: spec.evals_per_sequence,
                islands: 2,
                ..Default::default()
            },
            spec.limits,
            &inner,
            false,
        );
        if inner.is_cancelled() {
            break;
        }
        let o = match outcome {
            Ok(o) => o,
            Err(e) => {
                ex.pruned
                    .push((label(s), format!("the sequence cannot be searched: {e}")));
                continue;
            }
        };
        let (_, e) = evaluate_design(&o.design);
        progress.offer_best(o.result.score);
        ex.ranked.push(Candidate {
            label: label(s),
            launch: o.design.stops[0].epoch,
            tof_days: e.total_tof_days(),
            c3: e.launch.c3,
            dv_km_s: e.ledger.total_dv_km_s,
            delivered_kg: e.ledger.delivered_mass_kg,
            feasible: o.result.feasible(),
            breaches: o.result.breach_lines(),
            value: o.result.score,
            objective: o.result.objective,
            design: o.design,
        });
        progress.add(1);
    }
    ex.rank();
    ex
}

impl Exploration {
    /// Order the candidates: those that meet every limit first, then by objective, then by label
    /// (so that equal values rank the same way on every machine).
    pub fn rank(&mut self) {
        self.ranked.sort_by(|a, b| {
            b.feasible
                .cmp(&a.feasible)
                .then(a.value.total_cmp(&b.value))
                .then(a.label.cmp(&b.label))
        });
        self.pruned.sort();
    }

    /// The exploration as JSON lines: one line for the counts and pruned sequences, then one
    /// line per candidate. What `--shard` writes and `--merge` reads.
    pub fn to_json_lines(&self) -> String {
        let mut out = serde_json::json!({
            "enumerated": self.enumerated,
            "pruned": self.pruned,
        })
        .to_string();
        out.push('\n');
        for c in &self.ranked {
            if let Ok(line) = serde_json::to_string(c) {
                out.push_str(&line);
                out.push('\n');
            }
        }
        out
    }

    /// Merge shards' JSON lines into one ranked exploration. `name` names the text in errors.
    pub fn merge_json_lines<'a>(
        parts: impl IntoIterator<Item = (&'a str, &'a str)>,
    ) -> Result<Exploration, String> {
        let mut ex = Exploration::default();
        for (name, text) in parts {
            for (i, line) in text.lines().enumerate() {
                if line.trim().is_empty() {
                    continue;
                }
                let v: serde_json::Value =
                    serde_json::from_str(line).map_err(|e| format!("{name}:{}: {e}", i + 1))?;
                if v.get("enumerated").is_some() {
                    ex.enumerated += v["enumerated"].as_u64().unwrap_or(0) as usize;
                    let pruned: Vec<(String, String)> = serde_json::from_value(v["pruned"].clone())
                        .map_err(|e| format!("{name}:{}: {e}", i + 1))?;
                    ex.pruned.extend(pruned);
                } else {
                    let c: Candidate =
                        serde_json::from_value(v).map_err(|e| format!("{name}:{}: {e}", i + 1))?;
                    ex.ranked.push(c);
                }
            }
        }
        ex.rank();
        Ok(ex)
    }
}
