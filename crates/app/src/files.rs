//! Where the app keeps things outside the study files: preferences in eframe's storage
//! (recent files, theme) and the recovery copy written while there are unsaved changes.

use quenchless_profile::{Study, storage};
use serde::{Deserialize, Serialize};
use std::path::{Path, PathBuf};

/// Key of the preferences in eframe's storage.
pub const PREFS_KEY: &str = "quenchless.preferences";
/// Most recent files remembered.
pub const MAX_RECENT: usize = 8;

/// Preferences kept between runs (never the study itself).
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize, Default)]
#[serde(default)]
pub struct Preferences {
    /// Recently opened or saved study files, newest first.
    pub recent: Vec<PathBuf>,
    /// Dark theme (else light).
    pub dark: bool,
    /// Which file dialog to use.
    pub dialogs: crate::file_chooser::DialogPreference,
}

impl Preferences {
    /// Moves `path` to the front of the recent list.
    pub fn remember(&mut self, path: &Path) {
        self.recent.retain(|p| p != path);
        self.recent.insert(0, path.to_path_buf());
        self.recent.truncate(MAX_RECENT);
    }
}

/// The default recovery file: next to eframe's storage of this app.
pub fn default_recovery_path() -> Option<PathBuf> {
    eframe::storage_dir("Quenchless").map(|d| d.join("recovery.ron"))
}

/// What a recovery file holds: the study and the file it belonged to.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Recovery {
    /// The file the study was opened from or saved to, if any.
    pub path: Option<PathBuf>,
    /// The RON text of the unsaved study.
    pub study_ron: String,
}

/// Writes the recovery file (atomic).
pub fn write_recovery(path: &Path, study: &Study, origin: Option<&Path>) -> Result<(), String> {
    if let Some(dir) = path.parent() {
        std::fs::create_dir_all(dir).map_err(|e| format!("{}: {e}", dir.display()))?;
    }
    // The recovery keeps even an invalid study: the user's work matters more.
    let cfg = ron::ser::PrettyConfig::new().struct_names(true);
    let study_ron = ron::ser::to_string_pretty(study, cfg.clone()).map_err(|e| e.to_string())?;
    let rec = Recovery { path: origin.map(Path::to_path_buf), study_ron };
    let text = ron::ser::to_string_pretty(&rec, cfg).map_err(|e| e.to_string())?;
    storage::write_atomically(path, text.as_bytes()).map_err(|e| e.to_string())
}

/// Reads a recovery file; `None` if there is none or it cannot be read.
pub fn read_recovery(path: &Path) -> Option<(Study, Option<PathBuf>)> {
    let text = std::fs::read_to_string(path).ok()?;
    let rec: Recovery = ron::from_str(&text).ok()?;
    let study: Study = ron::from_str(&rec.study_ron).ok()?;
    Some((study, rec.path))
}

/// Removes the recovery file (after a save or a deliberate discard).
pub fn clear_recovery(path: &Path) {
    // Missing is fine: there was nothing to recover.
    let _ = std::fs::remove_file(path);
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn recovery_round_trip_keeps_study_and_origin() {
        let dir = tempfile::tempdir().expect("temp dir");
        let p = dir.path().join("sub").join("recovery.ron");
        let s = crate::demo::demo_study();
        write_recovery(&p, &s, Some(Path::new("/x/y.ron"))).expect("write");
        let (back, origin) = read_recovery(&p).expect("read");
        assert_eq!(back, s);
        assert_eq!(origin.as_deref(), Some(Path::new("/x/y.ron")));
        clear_recovery(&p);
        assert!(read_recovery(&p).is_none());
    }

    #[test]
    fn recent_list_is_bounded_and_deduplicated() {
        let mut p = Preferences::default();
        for k in 0..12 {
            p.remember(Path::new(&format!("/f{k}.ron")));
        }
        p.remember(Path::new("/f5.ron"));
        assert_eq!(p.recent.len(), MAX_RECENT);
        assert_eq!(p.recent[0], Path::new("/f5.ron"));
        assert_eq!(p.recent.iter().filter(|r| r.as_path() == Path::new("/f5.ron")).count(), 1);
    }
}
