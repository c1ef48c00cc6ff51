//! Building the app in a test harness.

use egui_kittest::Harness;
use quenchless_app::{AppOptions, QuenchlessApp};

/// The app in a 1400×1000 harness with no recovery file.
pub fn app_harness() -> Harness<'static, QuenchlessApp> {
    app_harness_with(AppOptions::default())
}

/// The app with given options.
pub fn app_harness_with(options: AppOptions) -> Harness<'static, QuenchlessApp> {
    let mut h = Harness::builder()
        .with_size(egui::vec2(1400.0, 1000.0))
        .with_max_steps(20)
        .build_eframe(move |cc| QuenchlessApp::new(cc, options));
    h.run_ok();
    h
}
