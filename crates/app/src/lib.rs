//! Quenchless desktop app: shape trap-frequency ramps, watch every diagnostic while
//! dragging, compare candidates, build an engine cycle, save studies and export
//! waveforms. All numbers come from `quenchless-physics`; files from
//! `quenchless-profile`.

#![deny(missing_docs)]

pub mod app;
pub mod colours;
pub mod compute;
pub mod demo;
pub mod document;
pub mod edits;
pub mod error;
pub mod export;
pub mod export_dialog;
pub mod file_chooser;
pub mod files;
pub mod handles;
pub mod heatmap;
pub mod history;
pub mod interactive;
pub mod menu;
pub mod panels;
pub mod prompts;
pub mod units;
pub mod widgets;
pub mod worker;

pub use app::{AppOptions, QuenchlessApp};
pub use compute::{Quality, StudyResults, compute};
pub use menu::Page;

/// Opens the Quenchless window on the built-in invented scenario, or on `open`. If an
/// earlier session left unsaved work, the app offers to restore it.
pub fn run_app(open: Option<std::path::PathBuf>) -> Result<(), String> {
    let options = eframe::NativeOptions {
        viewport: egui::ViewportBuilder::default()
            .with_title("Quenchless — frictionless ramp designer")
            .with_inner_size([1500.0, 950.0])
            .with_min_inner_size([900.0, 600.0]),
        renderer: eframe::Renderer::Glow,
        ..eframe::NativeOptions::default()
    };
    eframe::run_native(
        "Quenchless",
        options,
        Box::new(move |cc| Ok(Box::new(QuenchlessApp::new(cc, AppOptions::desktop(open))))),
    )
    .map_err(|e| format!("could not open the window: {e}"))
}
