//! What the workbench's components share: the settings kept between runs and the per-frame
//! [`ViewCtx`] every panel and view reads. It depends on nothing but the actions and the jobs, so
//! the components do not import the app and the app is the only module that imports them all.

use std::path::PathBuf;

use tourwright_mission::evaluate::Evaluation;
use tourwright_mission::report::Table;
use tourwright_mission::{MissionDesign, PreparedTour};

use super::action::View;
use super::jobs::Jobs;

/// Settings kept between runs.
#[derive(Clone, Debug, serde::Serialize, serde::Deserialize)]
#[serde(default)]
pub struct Settings {
    /// Dark theme.
    pub dark: bool,
    /// Recent files, newest first.
    pub recent: Vec<PathBuf>,
    /// Show the tour panel.
    pub show_tour: bool,
    /// Show the ledger.
    pub show_ledger: bool,
    /// Show the search panel.
    pub show_search: bool,
    /// The view shown.
    pub view: View,
    /// The ledger's height, points.
    pub ledger_height: f32,
    /// The default JPL kernel (the last one chosen), for designs that ask for "the default".
    #[serde(default)]
    pub default_kernel: Option<PathBuf>,
}

impl Default for Settings {
    fn default() -> Self {
        Settings {
            dark: true,
            recent: vec![],
            show_tour: true,
            show_ledger: true,
            show_search: false,
            view: View::Sun,
            ledger_height: LEDGER_DEFAULT_HEIGHT,
            default_kernel: None,
        }
    }
}

/// What every view reads in a frame: the design, its prepared tour and evaluation (always of the
/// same design state), the report rows, the selection, the jobs.
pub struct ViewCtx<'a> {
    /// The design.
    pub design: &'a MissionDesign,
    /// The prepared tour (absent when the design cannot be prepared; see the warnings).
    pub tour: Option<&'a PreparedTour>,
    /// The evaluation of `tour`.
    pub eval: &'a Evaluation,
    /// The event table of `eval`.
    pub events: &'a Table,
    /// The selected stop.
    pub selected: usize,
    /// Dark theme.
    pub dark: bool,
    /// Document revision.
    pub revision: u64,
    /// Document generation.
    pub generation: u64,
    /// A gesture is open.
    pub in_gesture: bool,
    /// Jobs and their results.
    pub jobs: &'a Jobs,
}

/// The ledger's smallest height, points: its heading, the column header and two rows.
pub const LEDGER_MIN_HEIGHT: f32 = 110.0;
/// The ledger's height on first start, points: a five-stop tour with a manoeuvre.
pub const LEDGER_DEFAULT_HEIGHT: f32 = 200.0;
