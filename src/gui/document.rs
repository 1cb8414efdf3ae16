//! The open document: the design, its file, and undo/redo. Changes arrive as [`Edit`] values;
//! each is one undo step, or part of a gesture (dragging a periapsis, scrubbing a number) that
//! becomes one step when it ends.
//!
//! Every document has a generation (which opened document it is) and a revision (which state of
//! it), both drawn from process-wide counters, so that no two documents or states share a number
//! and a job's result can always be matched with the state it was computed for.

use std::path::PathBuf;
use std::sync::atomic::{AtomicU64, Ordering};

use tourwright_mission::{Edit, EditError, MissionDesign};

/// Undo history depth.
const MAX_UNDO: usize = 200;

static NEXT_NUMBER: AtomicU64 = AtomicU64::new(1);

fn next_number() -> u64 {
    NEXT_NUMBER.fetch_add(1, Ordering::Relaxed)
}

/// A design being edited.
#[derive(Clone, Debug)]
pub struct Document {
    design: MissionDesign,
    /// Its file, once saved or opened.
    pub path: Option<PathBuf>,
    saved: Option<MissionDesign>,
    undo: Vec<MissionDesign>,
    redo: Vec<MissionDesign>,
    gesture_start: Option<MissionDesign>,
    revision: u64,
    generation: u64,
}

impl Document {
    /// A document for a design read from `path` (or new when `None`).
    pub fn new(design: MissionDesign, path: Option<PathBuf>) -> Self {
        Document {
            saved: path.is_some().then(|| design.clone()),
            design,
            path,
            undo: Vec::new(),
            redo: Vec::new(),
            gesture_start: None,
            revision: next_number(),
            generation: next_number(),
        }
    }

    /// A document restored from an autosave: it belongs to `path` (when it had one) but differs
    /// from it until saved.
    pub fn recovered(design: MissionDesign, path: Option<PathBuf>) -> Self {
        let mut d = Document::new(design, path);
        d.saved = None;
        d
    }

    /// The design as it is now.
    pub fn design(&self) -> &MissionDesign {
        &self.design
    }

    /// Changes whenever the design changes; unique across documents.
    pub fn revision(&self) -> u64 {
        self.revision
    }

    /// Which opened document this is; unique across documents.
    pub fn generation(&self) -> u64 {
        self.generation
    }

    /// True when the design differs from the file on disk (or was never saved).
    pub fn is_dirty(&self) -> bool {
        self.saved.as_ref() != Some(&self.design)
    }

    /// Record that the current design is what `path` now holds.
    pub fn mark_saved(&mut self, path: PathBuf) {
        self.path = Some(path);
        self.saved = Some(self.design.clone());
    }

    /// A discrete edit: one undo step. On an error nothing changes.
    pub fn apply(&mut self, edit: Edit) -> Result<(), EditError> {
        self.commit_gesture();
        let before = self.design.clone();
        edit.apply(&mut self.design)?;
        if self.design != before {
            self.push_undo(before);
            self.redo.clear();
            self.revision = next_number();
        }
        Ok(())
    }

    /// A live edit inside a gesture: applied now, undone as one step with the rest of the gesture.
    pub fn apply_live(&mut self, edit: Edit) -> Result<(), EditError> {
        let snapshot = self.design.clone();
        edit.apply(&mut self.design)?;
        if self.design != snapshot {
            if self.gesture_start.is_none() {
                self.gesture_start = Some(snapshot);
            }
            self.revision = next_number();
        }
        Ok(())
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
                self.revision = next_number();
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
                self.revision = next_number();
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

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn revisions_and_generations_are_unique_across_documents() {
        let a = Document::new(MissionDesign::new_blank(), None);
        let b = Document::new(MissionDesign::new_blank(), None);
        assert_ne!(a.generation(), b.generation());
        assert_ne!(a.revision(), b.revision());
    }

    #[test]
    fn a_gesture_is_one_undo_step_and_a_refused_edit_changes_nothing() {
        let mut d = Document::new(MissionDesign::new_blank(), None);
        d.apply_live(Edit::SetName("a".into())).unwrap();
        d.apply_live(Edit::SetName("ab".into())).unwrap();
        d.commit_gesture();
        assert!(d.undo());
        assert_eq!(d.design().name, "Untitled tour");
        assert!(!d.undo());
        let rev = d.revision();
        assert!(d.apply(Edit::RemoveStop(0)).is_err());
        assert_eq!(d.revision(), rev);
        assert_eq!(d.design().stops.len(), 2);
    }
}
