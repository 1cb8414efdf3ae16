//! The sample designs shipped inside the program.

use std::path::{Path, PathBuf};

use tourwright_mission::{MissionDesign, files};

/// Sample designs shipped inside the program (file name, text).
pub const SAMPLES: [(&str, &str); 5] = [
    (
        "lantern-jupiter-evej.tour.ron",
        include_str!("../../sample-missions/lantern-jupiter-evej.tour.ron"),
    ),
    (
        "tern-saturn-ejs.tour.ron",
        include_str!("../../sample-missions/tern-saturn-ejs.tour.ron"),
    ),
    (
        "wayfarer-belt-em.tour.ron",
        include_str!("../../sample-missions/wayfarer-belt-em.tour.ron"),
    ),
    (
        "ember-mercury-evvme.tour.ron",
        include_str!("../../sample-missions/ember-mercury-evvme.tour.ron"),
    ),
    (
        "osprey-jupiter-eej.tour.ron",
        include_str!("../../sample-missions/osprey-jupiter-eej.tour.ron"),
    ),
];

/// The design of an embedded sample, with the repository path when the file is there.
pub fn sample_design(i: usize) -> (MissionDesign, Option<PathBuf>) {
    let (name, text) = SAMPLES[i.min(SAMPLES.len() - 1)];
    let on_disk = Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("sample-missions")
        .join(name);
    // The samples are checked by a test; a broken one still opens the workbench on a blank design.
    let d = files::from_str(text, Path::new(name)).unwrap_or_else(|_| MissionDesign::new_blank());
    (d, on_disk.exists().then_some(on_disk))
}
