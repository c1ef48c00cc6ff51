//! Opens the Quenchless window, on a study file if one is given:
//! `cargo run --release -p quenchless-app --example open_study -- sample_profiles/x.ron`.

fn main() {
    let path = std::env::args_os().nth(1).map(std::path::PathBuf::from);
    if let Err(e) = quenchless_app::run_app(path) {
        eprintln!("{e}");
        std::process::exit(1);
    }
}
