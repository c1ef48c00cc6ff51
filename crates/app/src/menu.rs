//! The menu bar and the keyboard shortcuts: they draw and return commands, which the
//! app carries out after the frame's layout.

use crate::file_chooser::DialogPreference;
use crate::files::Preferences;
use crate::panels::plots::{FigureFormat, Quantity};
use egui::{Key, KeyboardShortcut, Modifiers};
use std::path::PathBuf;

/// The pages of the central area.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Page {
    /// Shaping plot, verdict and diagnostics.
    Shape,
    /// Comparison table.
    Compare,
    /// Engine cycle.
    Cycle,
    /// Synthesis, playback, robustness and noise maps, spline optimiser.
    Design,
}

/// Something to do after the frame's layout.
#[derive(Debug, Clone, PartialEq)]
#[must_use]
pub enum Command {
    /// A new study.
    New,
    /// Open a study (this file, or ask for one).
    Open(Option<PathBuf>),
    /// Save to the study's file (or ask for one).
    Save,
    /// Save under a new name.
    SaveAs,
    /// Undo the latest step.
    Undo,
    /// Redo.
    Redo,
    /// Quit (asking first about unsaved changes).
    Quit,
    /// Import a waveform as a candidate.
    ImportWaveform,
    /// Export candidate i as played.
    ExportCsv(usize),
    /// Save the window (`None`) or the screen area of a plot as PNG.
    Png(Option<String>),
    /// Save a plot as a figure file drawn from the data (PNG or SVG).
    Figure(Quantity, FigureFormat),
}

/// What the menu shows and edits.
pub struct MenuState<'a> {
    /// Preferences (recent files, theme, file dialogs).
    pub prefs: &'a mut Preferences,
    /// The study's dimensionless view.
    pub dimensionless: &'a mut bool,
    /// Coherence ratio instead of L and C.
    pub show_coherence: &'a mut bool,
    /// The page shown.
    pub page: &'a mut Page,
    /// Whether undo and redo can act.
    pub can_undo: bool,
    /// See `can_undo`.
    pub can_redo: bool,
    /// The plots on screen (title, rectangle).
    pub plot_areas: &'a [(String, egui::Rect)],
    /// The selected candidate.
    pub selected: usize,
}

/// The keyboard shortcuts pressed this frame.
pub fn shortcuts(ctx: &egui::Context) -> Vec<Command> {
    let mut out = Vec::new();
    let typing = ctx.memory(|m| m.focused().is_some());
    ctx.input_mut(|i| {
        let cs = Modifiers::COMMAND | Modifiers::SHIFT;
        if i.consume_shortcut(&KeyboardShortcut::new(cs, Key::S)) {
            out.push(Command::SaveAs);
        }
        if i.consume_shortcut(&KeyboardShortcut::new(Modifiers::COMMAND, Key::S)) {
            out.push(Command::Save);
        }
        if i.consume_shortcut(&KeyboardShortcut::new(Modifiers::COMMAND, Key::O)) {
            out.push(Command::Open(None));
        }
        if !typing {
            if i.consume_shortcut(&KeyboardShortcut::new(cs, Key::Z))
                || i.consume_shortcut(&KeyboardShortcut::new(Modifiers::COMMAND, Key::Y))
            {
                out.push(Command::Redo);
            }
            if i.consume_shortcut(&KeyboardShortcut::new(Modifiers::COMMAND, Key::Z)) {
                out.push(Command::Undo);
            }
        }
    });
    out
}

/// Draws the menu bar; returns what was chosen.
pub fn menu_ui(ui: &mut egui::Ui, m: &mut MenuState<'_>) -> Vec<Command> {
    let mut commands = Vec::new();
    egui::MenuBar::new().ui(ui, |ui| {
        ui.menu_button("File", |ui| {
            if ui.button("New study").clicked() {
                commands.push(Command::New);
            }
            if ui.button("Open study…  (Ctrl+O)").clicked() {
                commands.push(Command::Open(None));
            }
            ui.menu_button("Open recent", |ui| {
                if m.prefs.recent.is_empty() {
                    ui.label("(none yet)");
                }
                for p in &m.prefs.recent {
                    if ui.button(p.display().to_string()).clicked() {
                        commands.push(Command::Open(Some(p.clone())));
                    }
                }
            });
            if ui.button("Save  (Ctrl+S)").clicked() {
                commands.push(Command::Save);
            }
            if ui.button("Save as…  (Ctrl+Shift+S)").clicked() {
                commands.push(Command::SaveAs);
            }
            ui.separator();
            if ui.button("Import waveform CSV…").clicked() {
                commands.push(Command::ImportWaveform);
            }
            if ui.button("Export selected ramp as CSV…").clicked() {
                commands.push(Command::ExportCsv(m.selected));
            }
            if ui.button("Save window as PNG…").clicked() {
                commands.push(Command::Png(None));
            }
            for (menu, format) in [("Save a plot as PNG", FigureFormat::Png), ("Save a plot as SVG", FigureFormat::Svg)]
            {
                ui.menu_button(menu, |ui| {
                    ui.label("Drawn from the data with axes, units and a legend (also: right-click a plot).");
                    for q in std::iter::once(Quantity::Omega).chain(Quantity::DIAGNOSTICS).chain([Quantity::Coherence])
                    {
                        if ui.button(q.title()).clicked() {
                            commands.push(Command::Figure(q, format));
                        }
                    }
                });
            }
            ui.separator();
            if ui.button("Quit").clicked() {
                commands.push(Command::Quit);
            }
        });
        ui.menu_button("Edit", |ui| {
            if ui.add_enabled(m.can_undo, egui::Button::new("Undo  (Ctrl+Z)")).clicked() {
                commands.push(Command::Undo);
            }
            if ui.add_enabled(m.can_redo, egui::Button::new("Redo  (Ctrl+Shift+Z)")).clicked() {
                commands.push(Command::Redo);
            }
        });
        ui.menu_button("View", |ui| {
            ui.checkbox(&mut m.prefs.dark, "dark theme");
            ui.checkbox(m.dimensionless, "dimensionless view");
            ui.checkbox(m.show_coherence, "coherence ratio instead of L and C");
            ui.menu_button("File dialogs", |ui| {
                for p in [DialogPreference::Automatic, DialogPreference::System, DialogPreference::BuiltIn] {
                    ui.radio_value(&mut m.prefs.dialogs, p, p.words());
                }
            });
        });
        ui.separator();
        for (page, name) in [
            (Page::Shape, "Shape & watch"),
            (Page::Compare, "Compare candidates"),
            (Page::Cycle, "Engine cycle"),
            (Page::Design, "Design & hardware"),
        ] {
            if ui.selectable_label(*m.page == page, name).clicked() {
                *m.page = page;
            }
        }
    });
    commands
}
