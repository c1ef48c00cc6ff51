//! Opens the window on the "Design & hardware" page with the demo's invariant shortcut
//! selected and its playback and robustness map started, as the README screenshot
//! shows it: `cargo run --release -p quenchless-app --example design_page [study.ron]`.

use quenchless_app::{AppOptions, Page, QuenchlessApp};

fn main() {
    let path = std::env::args_os().nth(1).map(std::path::PathBuf::from);
    let options = eframe::NativeOptions {
        viewport: egui::ViewportBuilder::default()
            .with_title("Quenchless — frictionless ramp designer")
            .with_inner_size([1600.0, 1000.0]),
        renderer: eframe::Renderer::Glow,
        ..eframe::NativeOptions::default()
    };
    let result = eframe::run_native(
        "Quenchless",
        options,
        Box::new(move |cc| {
            let mut app = QuenchlessApp::new(cc, AppOptions { recovery_path: None, ..AppOptions::desktop(path) });
            app.show_page(Page::Design);
            app.select(1.min(app.study().candidates.len().saturating_sub(1)));
            let study = app.study().clone();
            let selected = app.selected();
            let ctx = cc.egui_ctx.clone();
            let design = app.design_panel();
            design.playback.sync(&study);
            design.playback.start(&study, selected, Some(ctx.clone()));
            let settings = design.playback.settings.clone();
            design.robustness.calibration_percent = 12.0;
            design.robustness.duration_percent = 12.0;
            design.robustness.start(&study, selected, &settings, Some(ctx));
            Ok(Box::new(app))
        }),
    );
    if let Err(e) = result {
        eprintln!("could not open the window: {e}");
        std::process::exit(1);
    }
}
