//! The open document: the design, its file, and undo/redo. Continuous gestures (dragging a
//! periapsis, scrubbing a number) change the design live and become one undo step when they end.

use std::path::PathBuf;

use crate::mission::MissionDesign;

/// Undo history depth.
const MAX_UNDO: usize = 200;

/// A design being edited.
#[derive(Clone, Debug)]
pub struct Document {
    /// The design as it is now.
    pub design: MissionDesign,
    /// Its file, once saved or opened.
    pub path: Option<PathBuf>,
    saved: MissionDesign,
    undo: Vec<MissionDesign>,
    redo: Vec<MissionDesign>,
    gesture_start: Option<MissionDesign>,
    revision: u64,
}

impl Document {
    /// A document for a design read from `path` (or new when `None`).
    pub fn new(design: MissionDesign, path: Option<PathBuf>) -> Self {
        Document {
            saved: if path.is_some() {
                design.clone()
            } else {
                MissionDesign::new_blank()
            },
            design,
            path,
            undo: Vec::new(),
            redo: Vec::new(),
            gesture_start: None,
            revision: 1,
        }
    }

    /// Changes whenever the design changes (evaluation caches key on it).
    pub fn revision(&self) -> u64 {
        self.revision
    }

    /// True when the design differs from the file on disk (or was never saved).
    pub fn is_dirty(&self) -> bool {
        self.path.is_none() || self.design != self.saved
    }

    /// Record that the current design is what `path` now holds.
    pub fn mark_saved(&mut self, path: PathBuf) {
        self.path = Some(path);
        self.saved = self.design.clone();
    }

    /// A discrete edit: one undo step.
    pub fn edit(&mut self, f: impl FnOnce(&mut MissionDesign)) {
        self.commit_gesture();
        let before = self.design.clone();
        f(&mut self.design);
        if self.design != before {
            self.push_undo(before);
            self.redo.clear();
            self.revision += 1;
        }
    }

    /// Replace the whole design as one undo step (apply an optimiser result, a window-map click).
    pub fn replace(&mut self, d: MissionDesign) {
        self.edit(|x| *x = d);
    }

    /// A live edit inside a gesture: applied now, undone as one step with the rest of the gesture.
    pub fn edit_live(&mut self, f: impl FnOnce(&mut MissionDesign)) {
        if self.gesture_start.is_none() {
            self.gesture_start = Some(self.design.clone());
        }
        let before_rev = self.revision;
        let snapshot = self.design.clone();
        f(&mut self.design);
        if self.design != snapshot {
            self.revision = before_rev + 1;
        }
    }

    /// True while a gesture is open.
    pub fn in_gesture(&self) -> bool {
        self.gesture_start.is_some()
    }

    /// End the open gesture (if any) as one undo step.
    pub fn commit_gesture(&mut self) {
        if let Some(start) = self.gesture_start.take() {
            if start != self.design {
                self.push_undo(start);
                self.redo.clear();
            }
        }
    }

    fn push_undo(&mut self, d: MissionDesign) {
        self.undo.push(d);
        if self.undo.len() > MAX_UNDO {
            self.undo.remove(0);
        }
    }

    /// Undo the last step; false when there is none.
    pub fn undo(&mut self) -> bool {
        self.commit_gesture();
        match self.undo.pop() {
            Some(d) => {
                let now = std::mem::replace(&mut self.design, d);
                self.redo.push(now);
                self.revision += 1;
                true
            }
            None => false,
        }
    }

    /// Redo the last undone step; false when there is none.
    pub fn redo(&mut self) -> bool {
        self.commit_gesture();
        match self.redo.pop() {
            Some(d) => {
                let now = std::mem::replace(&mut self.design, d);
                self.undo.push(now);
                self.revision += 1;
                true
            }
            None => false,
        }
    }

    /// True when there is something to undo.
    pub fn can_undo(&self) -> bool {
        !self.undo.is_empty()
            || self
                .gesture_start
                .as_ref()
                .is_some_and(|g| *g != self.design)
    }

    /// True when there is something to redo.
    pub fn can_redo(&self) -> bool {
        !self.redo.is_empty()
    }
}
