//! Never lose work: where no system file dialog can be shown (no desktop portal, no
//! zenity, as on many lab PCs), saving, opening and exporting go through the built-in
//! chooser, saying once why; a failed save says why and leaves the study unsaved.

use crate::harness::app_harness_with;
use egui::{Key, Modifiers};
use egui_kittest::Harness;
use egui_kittest::kittest::Queryable as _;
use quenchless_app::file_chooser::{DialogPreference, FileRequest, NoSystemDialogs, SystemDialogs};
use quenchless_app::{AppOptions, QuenchlessApp};
use std::path::{Path, PathBuf};
use std::sync::Arc;

/// A system dialog that can be shown and answers with a fixed file.
#[derive(Debug)]
struct Answers(PathBuf);

impl SystemDialogs for Answers {
    fn unavailable_reason(&self) -> Option<String> {
        None
    }
    fn show(&self, _request: &FileRequest) -> Option<PathBuf> {
        Some(self.0.clone())
    }
}

fn without_system_dialogs() -> Harness<'static, QuenchlessApp> {
    let none = NoSystemDialogs("no desktop portal on the session bus, no zenity or kdialog on PATH".into());
    app_harness_with(AppOptions { system_dialogs: Some(Arc::new(none)), ..AppOptions::default() })
}

fn type_into(h: &mut Harness<'_, QuenchlessApp>, label: &str, text: &str) {
    h.get_by_label(label).focus();
    h.run_ok();
    h.key_press_modifiers(Modifiers::COMMAND, Key::A);
    h.get_by_label(label).type_text(text);
    h.run_ok();
}

fn choose(h: &mut Harness<'_, QuenchlessApp>, folder: &Path, name: &str, button: &str) {
    type_into(h, "Folder", &folder.display().to_string());
    type_into(h, "File name", name);
    h.get_by_label(button).click();
    h.run_ok();
}

#[test]
fn ctrl_s_without_a_system_dialog_saves_through_the_built_in_chooser() {
    let dir = tempfile::tempdir().expect("temp dir");
    let mut h = without_system_dialogs();
    h.get_by_label("Add candidate").click();
    h.run_ok();
    assert!(h.state().is_dirty());
    h.key_press_modifiers(Modifiers::COMMAND, Key::S);
    h.run_ok();
    assert!(h.query_by_label("Folder").is_some(), "the built-in chooser is open");
    assert!(h.query_by_label_contains("Using the built-in file chooser").is_some(), "says why, once");
    assert!(h.query_by_label_contains("no desktop portal").is_some());
    choose(&mut h, dir.path(), "mine", "Save here");
    let path = dir.path().join("mine.ron");
    assert!(path.is_file(), "saved with the study extension added");
    assert!(!h.state().is_dirty());
    assert_eq!(h.state().path(), Some(path.as_path()));
    let back = quenchless_profile::load_study(&path).expect("loads");
    assert_eq!(&back, h.state().study());
    // Replacing a file takes a second press.
    h.key_press_modifiers(Modifiers::COMMAND | Modifiers::SHIFT, Key::S);
    h.run_ok();
    choose(&mut h, dir.path(), "mine.ron", "Save here");
    assert!(h.query_by_label_contains("press “Save here” again").is_some());
    h.get_by_label("Save here").click();
    h.run_ok();
    assert!(h.query_by_label("Folder").is_none(), "closed once saved");
}

#[test]
fn the_built_in_chooser_opens_a_study_and_refuses_what_is_not_there() {
    let dir = tempfile::tempdir().expect("temp dir");
    let samples = Path::new(env!("CARGO_MANIFEST_DIR")).join("../../sample_profiles");
    let mut h = without_system_dialogs();
    h.key_press_modifiers(Modifiers::COMMAND, Key::O);
    h.run_ok();
    choose(&mut h, &dir.path().join("nowhere"), "x.ron", "Open this file");
    assert!(h.query_by_label_contains("no such folder").is_some());
    choose(&mut h, &samples, "missing.ron", "Open this file");
    assert!(h.query_by_label_contains("no such file").is_some());
    choose(&mut h, &samples, "tweezer_expansion.ron", "Open this file");
    assert!(h.state().study().name.starts_with("Tweezer expansion"));
    assert!(h.query_by_label("Folder").is_none());
}

#[test]
fn a_failed_save_says_why_and_leaves_the_study_unsaved() {
    let dir = tempfile::tempdir().expect("temp dir");
    let sub = dir.path().join("sub");
    std::fs::create_dir(&sub).expect("folder");
    let mut h = without_system_dialogs();
    h.state_mut().save_to(&sub.join("s.ron")).expect("first save");
    h.get_by_label("Add candidate").click();
    h.run_ok();
    // The folder goes away (an unplugged drive, a lost network share).
    std::fs::remove_dir_all(&sub).expect("removed");
    h.key_press_modifiers(Modifiers::COMMAND, Key::S);
    h.run_ok();
    assert!(h.state().is_dirty(), "still unsaved");
    let e = h.state().error().expect("an error is shown").to_string();
    assert!(e.starts_with("Not saved") && e.contains("s.ron"), "{e}");
    assert!(h.query_by_label_contains("Not saved").is_some(), "on screen");
}

#[test]
fn a_system_dialog_is_used_where_there_is_one_unless_the_setting_says_otherwise() {
    let dir = tempfile::tempdir().expect("temp dir");
    let target = dir.path().join("chosen.ron");
    let options = AppOptions { system_dialogs: Some(Arc::new(Answers(target.clone()))), ..AppOptions::default() };
    let mut h = app_harness_with(options);
    h.get_by_label("Add candidate").click();
    h.run_ok();
    h.key_press_modifiers(Modifiers::COMMAND, Key::S);
    h.run_ok();
    assert!(target.is_file(), "saved through the system dialog");
    assert!(h.query_by_label("Folder").is_none(), "no built-in chooser");
    h.state_mut().set_dialog_preference(DialogPreference::BuiltIn);
    h.key_press_modifiers(Modifiers::COMMAND | Modifiers::SHIFT, Key::S);
    h.run_ok();
    assert!(h.query_by_label("Folder").is_some(), "the setting forces the built-in chooser");
}

#[test]
fn export_goes_through_the_chooser_and_writes_the_played_file() {
    let dir = tempfile::tempdir().expect("temp dir");
    let mut h = without_system_dialogs();
    h.state_mut().acknowledge_caution();
    h.state_mut().open_export_dialog_for(0);
    h.run_ok();
    h.get_by_label("Choose file and export").click();
    h.run_ok();
    choose(&mut h, dir.path(), "ramp", "Save here");
    let text = std::fs::read_to_string(dir.path().join("ramp.csv")).expect("written");
    assert!(text.contains("# reading: hold") && text.contains("CAUTION"));
}

/// A session confined to a folder (as the random-interaction test is) refuses files
/// chosen outside it, even through `..` in the folder typed.
#[test]
fn a_sandboxed_session_refuses_files_outside_its_folder() {
    let dir = tempfile::tempdir().expect("temp dir");
    let inner = dir.path().join("inner");
    std::fs::create_dir(&inner).expect("folder");
    let options = AppOptions { sandbox: Some(inner.clone()), ..AppOptions::default() };
    let mut h = app_harness_with(options);
    h.key_press_modifiers(Modifiers::COMMAND, Key::S);
    h.run_ok();
    choose(&mut h, &inner.join(".."), "escaped", "Save here");
    assert!(!dir.path().join("escaped.ron").exists());
    assert!(h.state().error().is_some_and(|e| e.contains("the only folder this session uses")));
    h.key_press_modifiers(Modifiers::COMMAND, Key::S);
    h.run_ok();
    choose(&mut h, &inner, "kept", "Save here");
    assert!(inner.join("kept.ron").is_file());
}
