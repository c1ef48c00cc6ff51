//! `quenchless`: the desktop app with no arguments, headless commands otherwise.

fn main() -> std::process::ExitCode {
    quenchless::run(std::env::args_os())
}
