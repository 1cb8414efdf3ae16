//! Actions: everything a panel, a menu, a shortcut or a dialog wants done. Views return them;
//! the app applies them after the frame's panels are drawn, then refreshes the evaluation once.
//! Menus, shortcuts and buttons share these values, so that Edit ▸ Undo and Ctrl+Z are one path.

use std::path::PathBuf;

use tourwright_mission::{Edit, MissionDesign};
use tourwright_search::direct::DirectOptions;
use tourwright_search::explore::ExploreSpec;
use tourwright_search::optimize::OptimizeOptions;
use tourwright_search::window::WindowSpec;

/// The central views.
#[derive(Clone, Copy, Debug, PartialEq, Eq, serde::Serialize, serde::Deserialize)]
pub enum View {
    /// Heliocentric top view.
    Sun,
    /// Planet-centred view of one swing-by.
    Lens,
    /// Energy and v∞ along the tour.
    Ladder,
    /// Tour vs direct transfer.
    Direct,
    /// Porkchop view.
    Window,
    /// The launch period: C3, Δv and DLA against the launch day.
    Period,
    /// The Tisserand graph.
    Tisserand,
    /// The n-body fidelity check.
    Fidelity,
}

impl View {
    /// All views in tab order.
    pub const ALL: [View; 8] = [
        View::Sun,
        View::Lens,
        View::Ladder,
        View::Direct,
        View::Window,
        View::Period,
        View::Tisserand,
        View::Fidelity,
    ];

    /// Tab title.
    pub fn title(self) -> &'static str {
        match self {
            View::Sun => "Sun view",
            View::Lens => "Swing-by lens",
            View::Ladder => "Energy ladder",
            View::Direct => "Direct vs assist",
            View::Window => "Window map",
            View::Period => "Launch period",
            View::Tisserand => "Tisserand graph",
            View::Fidelity => "Fidelity",
        }
    }
}

/// Something that needs the user's consent because it would drop unsaved changes.
#[derive(Clone, Debug, PartialEq)]
pub enum Pending {
    /// Start a new design.
    New,
    /// Open a file (None: ask for one).
    Open(Option<PathBuf>),
    /// Open an embedded sample.
    Sample(usize),
    /// Replace the design with one from elsewhere (an explorer row, the direct transfer).
    Replace(Box<MissionDesign>),
    /// Close the window.
    Quit,
}

/// What a chosen path is for.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum PathPurpose {
    /// Open a design.
    Open,
    /// Save the design.
    SaveAs,
    /// Export the event table.
    EventsCsv,
    /// Export the ledger.
    LedgerCsv,
    /// Export trajectory samples.
    SamplesCsv,
    /// Export the OEM.
    Oem,
    /// Export the converged continuous n-body trajectory as an OEM.
    ContinuousOem,
    /// Export the launch period's table.
    PeriodCsv,
    /// Save a picture of the current view.
    Picture,
    /// Choose a JPL SPK kernel as the design's ephemeris.
    Kernel,
}

impl PathPurpose {
    /// Every export, with its menu label.
    pub const EXPORTS: [(&'static str, PathPurpose); 7] = [
        ("Event table (CSV)…", PathPurpose::EventsCsv),
        ("Ledger (CSV)…", PathPurpose::LedgerCsv),
        ("Trajectory samples (CSV)…", PathPurpose::SamplesCsv),
        ("Trajectory (CCSDS OEM)…", PathPurpose::Oem),
        (
            "Continuous n-body trajectory (CCSDS OEM)…",
            PathPurpose::ContinuousOem,
        ),
        ("Launch period (CSV)…", PathPurpose::PeriodCsv),
        ("Picture of the current view (PNG)…", PathPurpose::Picture),
    ];
}

/// A change of the persisted settings.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum SettingsChange {
    /// Show or hide the tour panel.
    ShowTour(bool),
    /// Show or hide the ledger.
    ShowLedger(bool),
    /// Show or hide the search panel.
    ShowSearch(bool),
    /// Dark (true) or light theme.
    Dark(bool),
    /// The central view.
    View(View),
}

/// Which kind of job.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub enum JobKind {
    /// Direct-vs-assist comparison.
    Direct,
    /// Window map.
    Window,
    /// Date optimiser.
    Optimize,
    /// Sequence explorer.
    Explore,
    /// n-body fidelity check.
    Fidelity,
    /// Continuous n-body trajectory (multiple shooting).
    Continuous,
    /// The launch period: each day's tour re-optimised.
    Period,
}

impl JobKind {
    /// Words for the status bar.
    pub fn label(self) -> &'static str {
        match self {
            JobKind::Direct => "direct transfer search",
            JobKind::Window => "window map",
            JobKind::Optimize => "date optimiser",
            JobKind::Explore => "sequence explorer",
            JobKind::Fidelity => "n-body check",
            JobKind::Continuous => "continuous n-body trajectory",
            JobKind::Period => "launch period",
        }
    }
}

/// A job to start on the current design.
#[derive(Clone, Debug)]
pub enum JobRequest {
    /// Find the best direct transfer and compare.
    Direct(DirectOptions),
    /// Compute a window map.
    Window(WindowSpec),
    /// Optimise the dates for an objective.
    Optimize(OptimizeOptions, tourwright_mission::Objective),
    /// Explore sequences.
    Explore(ExploreSpec),
    /// Run the n-body fidelity check.
    Fidelity,
    /// Solve for the continuous n-body trajectory.
    Continuous,
    /// Re-optimise the tour on each day of a launch period.
    Period(tourwright_search::period::PeriodOptions),
}

/// Everything the workbench can be asked to do.
#[derive(Clone, Debug)]
pub enum Action {
    /// Restore (true) or discard (false) the autosave at this index of the recovery list.
    Recover(usize, bool),
    /// A change to the design: one undo step.
    Edit(Edit),
    /// A change within the current gesture (one undo step when the gesture ends).
    EditLive(Edit),
    /// End the current gesture.
    CommitGesture,
    /// Undo the last step.
    Undo,
    /// Redo the last undone step.
    Redo,
    /// Select a stop (lens, tour panel, ledger).
    Select(usize),
    /// Do this, asking first when it would drop unsaved changes.
    Request(Pending),
    /// Do this now (consent given).
    Perform(Pending),
    /// Dismiss the unsaved-changes question.
    CancelPending,
    /// Save to the document's file, or ask for one.
    Save,
    /// Save, then carry on with a pending action once nothing is unsaved.
    SaveThen(Pending),
    /// Ask for a file and save there.
    SaveAs,
    /// Ask for a path for an export (or a picture).
    Export(PathPurpose),
    /// Use a typed or picked path for its purpose.
    PathChosen(PathPurpose, PathBuf),
    /// Close the typed-path prompt.
    ClosePathPrompt,
    /// Start a job.
    StartJob(JobRequest),
    /// Cancel running jobs of a kind.
    CancelJobs(JobKind),
    /// Retarget a shaped swing-by (optionally moving the next epoch).
    Retarget {
        /// Stop index.
        stop: usize,
        /// Also move the next stop's epoch.
        move_epoch: bool,
    },
    /// Change a setting.
    Settings(SettingsChange),
    /// Open a help topic.
    ShowHelp(&'static str),
    /// Close the help window.
    CloseHelp,
    /// Close the error dialog.
    DismissError,
    /// A message for the status bar (text, is an error).
    Status(String, bool),
    /// Put text on the clipboard.
    Copy(String),
}

/// The actions one frame collects.
pub type Actions = Vec<Action>;
