//! Opens the window on one page with its background work started, as the README
//! screenshots show it:
//! `cargo run --release -p quenchless-app --example design_page [study.ron] [page]`,
//! where page is `design` (the default: the second candidate played and its
//! robustness map computed), `cycle` (the power map computed), `wells` (the first
//! candidate checked in the real wells of its trap model), `compare` or `shape`.

use quenchless_app::{AppOptions, Page, QuenchlessApp};

fn main() {
    let mut args = std::env::args_os().skip(1);
    let path = args.next().filter(|a| !a.is_empty()).map(std::path::PathBuf::from);
    let page = args.next().and_then(|p| p.into_string().ok()).unwrap_or_else(|| "design".into());
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
            let ctx = cc.egui_ctx.clone();
            match page.as_str() {
                "shape" => app.show_page(Page::Shape),
                "compare" => app.show_page(Page::Compare),
                "cycle" => {
                    app.show_page(Page::Cycle);
                    let study = app.study().clone();
                    app.cycle_panel().start(&study, Some(ctx));
                }
                "wells" => {
                    // The anharmonic check of the first candidate, every other section folded.
                    app.show_page(Page::Design);
                    app.select(0);
                    let study = app.study().clone();
                    let design = app.design_panel();
                    design.open = [false, false, false, false, false, true];
                    design.real_wells.start(&study, 0, Some(ctx));
                }
                _ => {
                    app.show_page(Page::Design);
                    app.select(1.min(app.study().candidates.len().saturating_sub(1)));
                    let study = app.study().clone();
                    let selected = app.selected();
                    let design = app.design_panel();
                    design.playback.sync(&study);
                    design.playback.start(&study, selected, Some(ctx.clone()));
                    let settings = design.playback.settings.clone();
                    design.robustness.calibration_percent = 12.0;
                    design.robustness.duration_percent = 12.0;
                    design.robustness.start(&study, selected, &settings, Some(ctx));
                }
            }
            Ok(Box::new(app))
        }),
    );
    if let Err(e) = result {
        eprintln!("could not open the window: {e}");
        std::process::exit(1);
    }
}
