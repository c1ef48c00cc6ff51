//! End-to-end tests of the `quenchless` binary: every headless command, the JSON
//! contracts, and every bad input answered with exit status 2 and a message.

#![expect(clippy::unwrap_used, reason = "helpers of tests fail loudly on bad fixtures")]

mod common;

use common::{bin, fails_with, json, root, run, sample, write};

const EVAL_KEYS: [&str; 13] = [
    "duration_s",
    "omega_initial_rad_s",
    "omega_final_rad_s",
    "q_star",
    "q_star_minus_one",
    "final_coherence_ratio",
    "final_energy_quanta",
    "work_quanta",
    "friction_work_quanta",
    "casimir_drift",
    "min_omega2",
    "peak_energy_quanta",
    "energy_diagonal",
];

#[test]
fn eval_waveform_json_has_every_key() {
    let w = root().join("tests/reference/waveforms/compress_inverted.csv");
    let v = json(&["eval", "--waveform", w.to_str().unwrap(), "--occupation", "1", "--json"]);
    for k in EVAL_KEYS {
        assert!(v.get(k).is_some(), "missing {k}");
    }
    assert!(v["min_omega2"].as_f64().unwrap() < 0.0);
    assert!(v["energy_diagonal"].is_boolean());
    let held = json(&[
        "eval",
        "--waveform",
        root().join("tests/reference/waveforms/hold_steps.csv").to_str().unwrap(),
        "--hold",
        "--json",
    ]);
    assert!(held["q_star"].as_f64().unwrap() >= 1.0);
}

#[test]
fn eval_profile_all_and_one() {
    let p = sample("tweezer_expansion.ron");
    let all = json(&["eval", p.to_str().unwrap(), "--json"]);
    let arr = all.as_array().unwrap();
    assert_eq!(arr.len(), 4);
    for o in arr {
        assert!(o["name"].is_string());
        for k in EVAL_KEYS {
            assert!(o.get(k).is_some(), "missing {k}");
        }
    }
    let one = json(&["eval", p.to_str().unwrap(), "--ramp", "shortcut 15 us", "--json"]);
    assert_eq!(one["name"], "shortcut 15 us");
    // Chen et al., PRL 104, 063002 (2010): the shortcut ends energy-diagonal.
    assert!((one["q_star"].as_f64().unwrap() - 1.0).abs() < 1e-10);
    assert_eq!(one["energy_diagonal"], true);
    let text = run(&["eval", p.to_str().unwrap()]);
    assert!(text.status.success());
    assert!(String::from_utf8_lossy(&text.stdout).contains("PASS (energy-diagonal)"));
}

#[test]
#[expect(clippy::too_many_lines, reason = "one scenario per block, read top to bottom")]
fn cycle_profile_and_flags() {
    let v = json(&["cycle", sample("single_ion_engine.ron").to_str().unwrap(), "--json"]);
    for k in [
        "stable",
        "spectral_radius",
        "regime",
        "work_out_quanta",
        "heat_hot_quanta",
        "heat_cold_quanta",
        "efficiency",
        "cop",
        "otto_efficiency",
        "cycle_time_s",
        "power_w",
        "corners",
        "residual",
    ] {
        assert!(v.get(k).is_some(), "missing {k}");
    }
    assert_eq!(v["stable"], true);
    assert_eq!(v["regime"], "engine");
    let corners = v["corners"].as_array().unwrap();
    assert_eq!(corners.len(), 4);
    assert_eq!(corners[0]["label"], "start of hot stroke");
    // Frictionless strokes and long contacts approach the ideal Otto efficiency
    // 1 - omega_c/omega_h (Rezek and Kosloff 2006) from below.
    let eff = v["efficiency"].as_f64().unwrap();
    assert!(eff > 0.0 && eff <= v["otto_efficiency"].as_f64().unwrap() + 1e-9);

    let flags = [
        "cycle",
        "--hot-freq",
        "200kHz",
        "--cold-freq",
        "80 kHz",
        "--hot-occupation",
        "4",
        "--cold-temp",
        "2uK",
        "--hot-rate",
        "4e4",
        "--cold-rate",
        "4e4",
        "--hot-time",
        "50us",
        "--cold-time",
        "50 µs",
        "--expand",
        "shortcut",
        "--expand-time",
        "12us",
        "--compress",
        "constant-mu",
        "--compress-time",
        "12us",
        "--json",
    ];
    let v = json(&flags);
    assert_eq!(v["stable"], true);
    // Ideal strokes reproduce the Otto efficiency exactly (Rezek and Kosloff 2006).
    let v = json(&[
        "cycle",
        "--hot-freq",
        "200kHz",
        "--cold-freq",
        "80kHz",
        "--hot-occupation",
        "4",
        "--cold-occupation",
        "0.5",
        "--hot-rate",
        "1e6",
        "--cold-rate",
        "1e6",
        "--hot-time",
        "100us",
        "--cold-time",
        "100us",
        "--expand",
        "adiabatic",
        "--expand-time",
        "1us",
        "--compress",
        "adiabatic",
        "--compress-time",
        "1us",
        "--json",
    ]);
    assert!((v["efficiency"].as_f64().unwrap() - 0.6).abs() < 1e-12);
    // Sudden strokes with weak baths and quarter-period contacts: unstable, no figures.
    let v = json(&[
        "cycle",
        "--hot-freq",
        "100kHz",
        "--cold-freq",
        "30kHz",
        "--hot-occupation",
        "1",
        "--cold-occupation",
        "0.1",
        "--hot-rate",
        "1",
        "--cold-rate",
        "1",
        "--hot-time",
        "2.5us",
        "--cold-time",
        "8.333333333us",
        "--expand",
        "sudden",
        "--compress",
        "sudden",
        "--json",
    ]);
    assert_eq!(v["stable"], false);
    assert!(v["work_out_quanta"].is_null() && v["efficiency"].is_null() && v["corners"].is_null());
    let text = run(&["cycle", sample("single_ion_engine.ron").to_str().unwrap()]);
    assert!(String::from_utf8_lossy(&text.stdout).contains("work delivered"));
}

#[test]
fn export_writes_a_csv_with_provenance() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("ramp.csv");
    let o = run(&[
        "export",
        sample("tweezer_expansion.ron").to_str().unwrap(),
        "--ramp",
        "shortcut 15 us",
        "--rate",
        "1e7",
        "--out",
        out.to_str().unwrap(),
    ]);
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    assert!(String::from_utf8_lossy(&o.stderr).contains("CAUTION"));
    let text = std::fs::read_to_string(&out).unwrap();
    assert!(text.starts_with("# written by quenchless"));
    assert!(text.contains("study: Tweezer expansion"));
    assert!(text.contains("# reading: hold"));
    // 15 us at 1e7 samples/s: 150 periods held in 8 sub-steps each (the sample's
    // low-pass), then the final level until the output settled, then the level left on.
    let rows = text.lines().filter(|l| !l.starts_with('#')).count() - 1;
    assert!(rows > 150 * 8 + 1, "{rows} rows");
    // The exported file is what `play` judged: its Q* read back is the played Q*.
    let v = json(&["eval", "--waveform", out.to_str().unwrap(), "--json"]);
    let p = json(&[
        "play",
        sample("tweezer_expansion.ron").to_str().unwrap(),
        "--ramp",
        "shortcut 15 us",
        "--rate",
        "1e7",
        "--json",
    ]);
    let (a, b) = (v["q_star"].as_f64().unwrap(), p["played_q_star"].as_f64().unwrap());
    assert!((a - b).abs() < 1e-12, "file {a} vs played {b}");
}

#[test]
fn bad_waveform_inputs_exit_2_with_a_message() {
    let dir = tempfile::tempdir().unwrap();
    let d = dir.path();
    let cases = [
        ("empty.csv", "", "no header"),
        ("noheader.csv", "0,1\n1,2\n", "missing header"),
        ("unknown.csv", "time,freq\n0,1\n1,2\n", "unknown time column"),
        ("text.csv", "t,omega\n0,abc\n1,2\n", "text.csv:2:3"),
        ("nan.csv", "t,omega\n0,NaN\n1,2\n", "not finite"),
        ("inf.csv", "t,omega\n0,1\n1,inf\n", "not finite"),
        ("order.csv", "t,omega\n0,1\n2,2\n1,3\n", "times must increase"),
        ("negative.csv", "t,omega\n0,1\n1,-2\n", "must be > 0"),
        ("short.csv", "t,omega\n0,1\n", "at least 2 data rows"),
    ];
    for (name, text, needle) in cases {
        let f = write(d, name, text);
        fails_with(&["eval", "--waveform", &f, "--json"], needle);
    }
    fails_with(&["eval", "--waveform", d.join("missing.csv").to_str().unwrap()], "missing.csv");
    let good = write(d, "good.csv", "t,omega\n0,1e6\n1e-6,5e5\n");
    fails_with(&["eval", "--waveform", &good, "--occupation", "-1"], "--occupation -1");
    fails_with(&["eval", "--waveform", &good, "--tolerance", "0"], "--tolerance 0");
    fails_with(&["eval", "--waveform", &good, "--accuracy", "1e-30"], "--accuracy");
}

#[test]
fn bad_cycle_inputs_exit_2_with_a_message() {
    let base = |over: &[(&str, &str)]| -> Vec<String> {
        let mut m: Vec<(String, String)> = [
            ("--hot-freq", "200kHz"),
            ("--cold-freq", "80kHz"),
            ("--hot-occupation", "4"),
            ("--cold-occupation", "0.5"),
            ("--hot-rate", "4e4"),
            ("--cold-rate", "4e4"),
            ("--hot-time", "50us"),
            ("--cold-time", "50us"),
            ("--expand", "linear"),
            ("--expand-time", "12us"),
            ("--compress", "linear"),
            ("--compress-time", "12us"),
        ]
        .iter()
        .map(|(a, b)| (a.to_string(), b.to_string()))
        .collect();
        for (k, v) in over {
            match m.iter_mut().find(|(a, _)| a == k) {
                Some(e) => e.1 = v.to_string(),
                None => m.push((k.to_string(), v.to_string())),
            }
        }
        std::iter::once("cycle".to_string()).chain(m.into_iter().flat_map(|(a, b)| [a, b])).collect()
    };
    let check = |over: &[(&str, &str)], needle: &str| {
        let args = base(over);
        let refs: Vec<&str> = args.iter().map(String::as_str).collect();
        fails_with(&refs, needle);
    };
    check(&[("--hot-freq", "200")], "needs a unit");
    check(&[("--hot-freq", "200 khz")], "unknown frequency unit");
    check(&[("--cold-freq", "300kHz")], "must be below --hot-freq");
    check(&[("--hot-rate", "-5")], "--hot-rate -5");
    check(&[("--hot-time", "-5us")], "--hot-time -5us: allowed a finite time >= 0");
    check(&[("--expand-time", "-1us")], "--expand-time -1us: allowed a finite time >= 0");
    check(&[("--cold-temp", "1uK")], "cannot be used with");
    check(&[("--expand", "wobbly")], "invalid value");
    // A waveform whose end frequencies disagree with the cycle's.
    let dir = tempfile::tempdir().unwrap();
    let w = write(dir.path(), "wrong.csv", "t[us],nu[kHz]\n0,200\n12,81\n");
    let mut args = base(&[]);
    let pos = args.iter().position(|a| a == "--expand").unwrap();
    args.splice(pos..pos + 4, ["--expand-waveform".to_string(), w]);
    let refs: Vec<&str> = args.iter().map(String::as_str).collect();
    fails_with(&refs, "expansion ramp end frequency");
}

#[test]
fn bad_profiles_exit_2_with_a_message() {
    let dir = tempfile::tempdir().unwrap();
    let d = dir.path();
    let bad = write(d, "bad.ron", "Study(\n  format_version: 1,\n  tolerance: oops,\n)");
    fails_with(&["eval", &bad], "bad.ron:3:");
    let newer = write(d, "newer.ron", "Study(format_version: 7)");
    fails_with(&["eval", &newer], "newer than this Quenchless reads");
    let p = sample("tweezer_expansion.ron");
    fails_with(&["eval", p.to_str().unwrap(), "--ramp", "nope"], "no such candidate");
    fails_with(&["cycle", p.to_str().unwrap()], "has no cycle");
    fails_with(
        &[
            "export",
            p.to_str().unwrap(),
            "--ramp",
            "straight line",
            "--rate",
            "-3",
            "--out",
            d.join("x.csv").to_str().unwrap(),
        ],
        "--rate -3",
    );
    fails_with(&["frobnicate"], "unrecognized subcommand");
}

#[test]
fn design_commands_and_their_outputs() {
    // Rezek and Kosloff (2006) check value, scaled: the order-1
    // frictionless constant-mu ramp for a tenfold expansion has mu = -0.68818.
    let v = json(&["design", "constant-mu", "--from", "100kHz", "--to", "10kHz", "--order", "1", "--json"]);
    assert!((v["mu"].as_f64().unwrap() + 0.68818).abs() < 5e-6);
    assert!((v["q_star"].as_f64().unwrap() - 1.0).abs() < 1e-10);
    assert!(v["duration_s"].as_f64().unwrap() > 0.0);
    // A shortcut so short that the trap must invert (Chen et al. 2010 ansatz).
    let v = json(&["design", "shortcut", "--from", "100kHz", "--to", "10kHz", "--time", "1us", "--json"]);
    assert_eq!(v["inverts"], true);
    assert!(v["min_omega2"].as_f64().unwrap() < 0.0);
    assert!((v["q_star"].as_f64().unwrap() - 1.0).abs() < 1e-10);
    let v = json(&["design", "shortcut", "--from", "100kHz", "--to", "10kHz", "--min-omega2", "-1e9", "--json"]);
    assert!(v["min_omega2"].as_f64().unwrap() >= -1e9 * (1.0 + 1e-6));
    assert!(v["duration_s"].as_f64().unwrap() > 0.0);
    // Time-optimal holds, closed form derived from the frictionless condition (compare Salamon et al. 2009).
    let dir = tempfile::tempdir().unwrap();
    let wave = dir.path().join("bb.csv");
    let prof = dir.path().join("bb.ron");
    let v = json(&[
        "design",
        "bang-bang",
        "--from",
        "100kHz",
        "--to",
        "30kHz",
        "--min",
        "30kHz",
        "--max",
        "100kHz",
        "--json",
        "--waveform-out",
        wave.to_str().unwrap(),
        "--rate",
        "1e9",
        "--profile-out",
        prof.to_str().unwrap(),
    ]);
    let (wh, wc) = (std::f64::consts::TAU * 100e3, std::f64::consts::TAU * 30e3);
    let phi = ((wh * wh + wc * wc) / ((wh + wc) * (wh + wc))).acos();
    let tau = 0.5 * phi * (1.0 / wc + 1.0 / wh);
    assert!((v["duration_s"].as_f64().unwrap() / tau - 1.0).abs() < 1e-12);
    assert_eq!(v["segments"].as_array().unwrap().len(), 2);
    assert!((v["segments"][0]["omega_rad_s"].as_f64().unwrap() / wc - 1.0).abs() < 1e-12);
    let again = json(&["eval", prof.to_str().unwrap(), "--json"]);
    assert_eq!(again[0]["energy_diagonal"], true);
    // Played at 1 GS/s with left hold the switch lands within a sample: close to 1.
    let played = json(&["eval", "--waveform", wave.to_str().unwrap(), "--hold", "--json"]);
    assert!(played["q_star"].as_f64().unwrap() - 1.0 < 1e-3);
    fails_with(
        &["design", "bang-bang", "--from", "100kHz", "--to", "30kHz", "--min", "40kHz", "--max", "100kHz"],
        "--min/--max",
    );
    fails_with(
        &["design", "shortcut", "--from", "100kHz", "--to", "10kHz", "--time", "-1us"],
        "--time -1us: allowed a finite time > 0",
    );
    fails_with(&["design", "constant-mu", "--from", "100", "--to", "10kHz", "--order", "1"], "needs a unit");
}

#[test]
fn sweep_writes_a_map_and_plots() {
    let dir = tempfile::tempdir().unwrap();
    let wave = root().join("tests/reference/waveforms/hold_steps.csv");
    let out = dir.path().join("map.csv");
    for plot in ["map.png", "map.svg"] {
        let p = dir.path().join(plot);
        let o = run(&[
            "sweep",
            "--waveform",
            wave.to_str().unwrap(),
            "--hold",
            "--calibration-error",
            "5%",
            "--duration-error",
            "0.05",
            "--grid",
            "9",
            "--out",
            out.to_str().unwrap(),
            "--plot",
            p.to_str().unwrap(),
        ]);
        assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
        assert!(std::fs::metadata(&p).unwrap().len() > 100);
    }
    // Figures are for talks: the title names the table, never the path to it.
    let svg = std::fs::read_to_string(dir.path().join("map.svg")).unwrap();
    assert!(svg.contains("hold_steps") && !svg.contains("tests/reference"), "a path in the figure");
    let text = std::fs::read_to_string(&out).unwrap();
    let mut lines = text.lines();
    assert_eq!(lines.next().unwrap(), "calibration_error,duration_error,q_star,q_star_minus_one,final_coherence_ratio");
    let rows: Vec<Vec<f64>> = lines.map(|l| l.split(',').map(|c| c.parse().unwrap()).collect()).collect();
    assert_eq!(rows.len(), 81);
    assert!((rows[0][0] + 0.05).abs() < 1e-15 && (rows[80][1] - 0.05).abs() < 1e-15, "endpoints included");
    // Husimi (1953): Q* >= 1, and the coherence ratio is sqrt(1 - 1/Q*²).
    for r in &rows {
        assert!(r[2] >= 1.0 && r[3] >= 0.0 && (r[2] - 1.0 - r[3]).abs() < 1e-15);
        assert!((r[4] - (1.0 - 1.0 / (r[2] * r[2])).sqrt()).abs() < 1e-12);
    }
    fails_with(
        &["sweep", "--waveform", wave.to_str().unwrap(), "--grid", "1", "--out", out.to_str().unwrap()],
        "--grid 1",
    );
    fails_with(
        &["sweep", "--waveform", wave.to_str().unwrap(), "--calibration-error", "abc", "--out", out.to_str().unwrap()],
        "--calibration-error",
    );
    fails_with(
        &[
            "sweep",
            "--waveform",
            wave.to_str().unwrap(),
            "--out",
            out.to_str().unwrap(),
            "--plot",
            dir.path().join("x.jpg").to_str().unwrap(),
        ],
        ".png or .svg",
    );
}

/// Every sample study loads and evaluates (and its cycle, if any, analyses).
#[test]
fn every_sample_profile_evaluates() {
    let mut n = 0;
    for entry in std::fs::read_dir(root().join("sample_profiles")).unwrap() {
        let p = entry.unwrap().path();
        if p.extension().is_none_or(|e| e != "ron") {
            continue;
        }
        let v = json(&["eval", p.to_str().unwrap(), "--json"]);
        assert!(!v.as_array().unwrap().is_empty());
        for o in v.as_array().unwrap() {
            assert!(o["q_star"].as_f64().unwrap() >= 1.0 - 1e-12, "{}: {}", p.display(), o["name"]);
        }
        let text = std::fs::read_to_string(&p).unwrap();
        if text.contains("cycle: Some(") {
            let c = json(&["cycle", p.to_str().unwrap(), "--json"]);
            assert!(c["stable"].is_boolean());
        }
        n += 1;
    }
    assert!(n >= 3);
}

/// Killing a saving process at random moments never leaves a damaged profile: the
/// atomic write (temporary file in the same folder, fsync, rename) means the target is
/// always the old or the new complete study (common practice, no source).
#[test]
fn killed_saves_never_damage_the_profile() {
    let dir = tempfile::tempdir().unwrap();
    let target = dir.path().join("kept.ron");
    let t = target.to_str().unwrap();
    let args = |order: &str| {
        vec![
            "design".to_string(),
            "constant-mu".into(),
            "--from".into(),
            "120kHz".into(),
            "--to".into(),
            "15kHz".into(),
            "--order".into(),
            order.into(),
            "--profile-out".into(),
            t.into(),
        ]
    };
    assert!(bin().args(args("1")).output().unwrap().status.success());
    let mut seed: u64 = 0x9e37_79b9_7f4a_7c15;
    let mut killed = 0;
    for i in 0..60 {
        // xorshift: a repeatable spread of kill delays from 0 to ~4 ms.
        seed ^= seed << 13;
        seed ^= seed >> 7;
        seed ^= seed << 17;
        let delay = std::time::Duration::from_micros(seed % 4000);
        let mut child = bin().args(args(if i % 2 == 0 { "2" } else { "3" })).spawn().unwrap();
        std::thread::sleep(delay);
        if child.try_wait().unwrap().is_none() {
            let _ = child.kill();
            killed += 1;
        }
        let _ = child.wait();
        let study = quenchless_profile::load_study(&target).unwrap_or_else(|e| panic!("after kill {i}: {e}"));
        assert_eq!(study.candidates.len(), 1);
    }
    assert!(killed > 0, "some saves were interrupted");
}

#[test]
fn play_reports_designed_versus_played() {
    let p = sample("ion_compression_tight.ron");
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("played.csv");
    let v = json(&[
        "play",
        p.to_str().unwrap(),
        "--ramp",
        "shortcut 120 ns",
        "--rate",
        "1e9",
        "--bipolar",
        "--json",
        "--out",
        out.to_str().unwrap(),
    ]);
    for k in ["designed_q_star", "played_q_star", "energy_diagonal_as_played", "min_rate_per_s", "samples"] {
        assert!(v.get(k).is_some(), "missing {k}");
    }
    // Chen et al. (2010): the designed shortcut is frictionless; played at 1 GS/s it is close.
    assert!((v["designed_q_star"].as_f64().unwrap() - 1.0).abs() < 1e-10);
    assert!(v["played_q_star"].as_f64().unwrap() - 1.0 < 1e-3);
    // The written table, read back with --hold, is the same played ramp: its comment line
    // states the designed end frequencies, so Q* is taken against them again.
    let again = json(&["eval", "--waveform", out.to_str().unwrap(), "--hold", "--json"]);
    let diff = (again["q_star"].as_f64().unwrap() - v["played_q_star"].as_f64().unwrap()).abs();
    assert!(diff < 1e-9, "{diff:e}");
    // An optical (unipolar) drive cannot play the inverted stretch: refused, not clipped.
    fails_with(
        &["play", p.to_str().unwrap(), "--ramp", "shortcut 120 ns", "--rate", "1e9", "--unipolar"],
        "cannot go negative",
    );
    fails_with(
        &[
            "play",
            p.to_str().unwrap(),
            "--ramp",
            "shortcut 120 ns",
            "--rate",
            "1e9",
            "--bipolar",
            "--bits",
            "12",
            "--full-scale",
            "1MHz",
        ],
        "not clipped",
    );
    fails_with(&["play", p.to_str().unwrap(), "--ramp", "shortcut 120 ns", "--rate", "0"], "--rate 0");
}

/// `design spline` moves the free knots of a profile's spline to Q* - 1 <= 1e-6 and
/// writes the study with the optimised candidate added; `eval` of that candidate agrees
/// (Husimi's Q*, K. Husimi, Prog. Theor. Phys. 9, 381 (1953)).
#[test]
fn design_spline_reaches_the_target_and_saves_the_candidate() {
    let p = sample("tweezer_expansion.ron");
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("optimised.ron");
    let v = json(&[
        "design",
        "spline",
        p.to_str().unwrap(),
        "--ramp",
        "hand-shaped spline",
        "--json",
        "--profile-out",
        out.to_str().unwrap(),
    ]);
    for k in ["q_star_start", "q_star", "reached", "within_limits", "iterations", "evaluations", "knots"] {
        assert!(v.get(k).is_some(), "missing {k}");
    }
    assert!(v["reached"].as_bool().unwrap() && v["within_limits"].as_bool().unwrap());
    assert!(v["q_star_start"].as_f64().unwrap() - 1.0 > 0.1);
    let e = json(&["eval", out.to_str().unwrap(), "--ramp", "hand-shaped spline (optimised)", "--json"]);
    let q = e["q_star"].as_f64().unwrap();
    assert!(q - 1.0 <= 1e-6 && (q - v["q_star"].as_f64().unwrap()).abs() < 1e-9, "{q}");
    fails_with(&["design", "spline", p.to_str().unwrap(), "--ramp", "straight line"], "needs a spline");
    fails_with(
        &["design", "spline", p.to_str().unwrap(), "--ramp", "hand-shaped spline", "--robust", "70%"],
        "--robust 70%",
    );
}

/// `tune-cycle` raises the power of the sample engine and reports the efficiency at
/// maximum power beside 1 - omega_c/omega_h and 1 - sqrt(T_c/T_h) (Curzon and Ahlborn,
/// Am. J. Phys. 43, 22 (1975)); the written profile's cycle reproduces the power.
#[test]
fn tune_cycle_raises_power_and_writes_the_cycle() {
    let p = sample("single_ion_engine.ron");
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("tuned.ron");
    let v = json(&["tune-cycle", p.to_str().unwrap(), "--json", "--profile-out", out.to_str().unwrap()]);
    for k in ["hot_time_s", "expansion_time_s", "cold_time_s", "compression_time_s", "otto_efficiency"] {
        assert!(v.get(k).is_some(), "missing {k}");
    }
    let (p1, p0) = (v["power_w"].as_f64().unwrap(), v["start_power_w"].as_f64().unwrap());
    assert!(p1 > p0, "{p1} <= {p0}");
    let total: f64 = ["hot_time_s", "expansion_time_s", "cold_time_s", "compression_time_s"]
        .iter()
        .map(|k| v[*k].as_f64().unwrap())
        .sum();
    assert!((total / v["total_time_s"].as_f64().unwrap() - 1.0).abs() < 1e-9);
    let c = json(&["cycle", out.to_str().unwrap(), "--json"]);
    let again = c["power_w"].as_f64().or_else(|| c["figures"]["power_w"].as_f64()).expect("power in the report");
    assert!((again / p1 - 1.0).abs() < 1e-6, "{again} vs {p1}");
    fails_with(&["tune-cycle", sample("tweezer_expansion.ron").to_str().unwrap()], "no cycle section");
}

/// `sweep-noise` writes one row per grid point; without noise the energy ratio is Q*
/// (Husimi 1953), and noise only adds energy here.
#[test]
fn sweep_noise_writes_the_energy_ratio_map() {
    let p = sample("tweezer_expansion.ron");
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("noise.csv");
    let plot = dir.path().join("noise.svg");
    let o = run(&[
        "sweep-noise",
        p.to_str().unwrap(),
        "--ramp",
        "shortcut 15 us",
        "--max-dephasing",
        "2e4",
        "--max-amplitude-psd",
        "1e-9",
        "--grid",
        "5",
        "--out",
        out.to_str().unwrap(),
        "--plot",
        plot.to_str().unwrap(),
    ]);
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    let text = std::fs::read_to_string(&out).unwrap();
    let mut lines = text.lines();
    assert_eq!(lines.next(), Some("dephasing_rate_per_s,amplitude_psd_s,energy_ratio,energy_ratio_minus_one"));
    let rows: Vec<Vec<f64>> = lines.map(|l| l.split(',').map(|c| c.parse().unwrap()).collect()).collect();
    assert_eq!(rows.len(), 25);
    assert!(rows[0][3] < 1e-9, "noiseless shortcut: {}", rows[0][3]);
    // Noise only heats (B. Savard, K. M. O'Hara and J. E. Thomas, Phys. Rev. A 56, R1095 (1997)).
    assert!(rows.iter().all(|r| r[3] >= rows[0][3] && (r[2] - 1.0 - r[3]).abs() < 1e-15));
    assert!(std::fs::read_to_string(&plot).unwrap().contains("<svg"));
    fails_with(
        &[
            "sweep-noise",
            p.to_str().unwrap(),
            "--ramp",
            "shortcut 15 us",
            "--max-dephasing",
            "-1",
            "--max-amplitude-psd",
            "1e-9",
            "--out",
            "x.csv",
        ],
        "--max-dephasing -1",
    );
}

/// `play` on a profile uses its generator section: DAC codes follow the straight-binary
/// transfer code = round(drive / full scale (2^N - 1)) (common practice, no source), and
/// the drive file starts at the calibrated drive of the start frequency.
#[test]
fn play_writes_dac_codes_and_drive_units() {
    let p = sample("tweezer_expansion.ron");
    let dir = tempfile::tempdir().unwrap();
    let (codes, drive) = (dir.path().join("codes.csv"), dir.path().join("drive.csv"));
    let v = json(&[
        "play",
        p.to_str().unwrap(),
        "--ramp",
        "shortcut 15 us",
        "--json",
        "--codes-out",
        codes.to_str().unwrap(),
        "--drive-out",
        drive.to_str().unwrap(),
    ]);
    assert_eq!(v["drive_unit"], "mW");
    let text = std::fs::read_to_string(&codes).unwrap();
    assert!(text.contains("CAUTION"));
    let rows: Vec<&str> = text.lines().filter(|l| !l.starts_with('#')).collect();
    assert_eq!(rows[0], "sample,t_s,code");
    // The N samples and the final level.
    assert_eq!(rows.len() - 1, v["samples"].as_u64().unwrap() as usize + 1);
    // 2 mW at 120 kHz on a 16-bit DAC over 0 to 2.5 mW.
    let first: u32 = rows[1].split(',').nth(2).unwrap().parse().unwrap();
    assert_eq!(first, (2.0f64 / 2.5 * 65535.0).round() as u32);
    let d = std::fs::read_to_string(&drive).unwrap();
    let first_drive: f64 =
        d.lines().find(|l| l.starts_with("0e0")).unwrap().split(',').nth(1).unwrap().parse().unwrap();
    assert!((first_drive - f64::from(first) * 2.5 / 65535.0).abs() < 1e-12);
    fails_with(
        &["play", p.to_str().unwrap(), "--ramp", "shortcut 15 us", "--jitter", "1us"],
        "eighth of the sample period",
    );
}

/// Every numeric flag of every command is range-checked: exit status 2 and a one-line
/// message naming the flag and the value (common practice, no source).
#[test]
#[expect(clippy::too_many_lines, reason = "one table of refused flags")]
fn every_numeric_flag_names_itself_when_out_of_range() {
    let t = sample("tweezer_expansion.ron");
    let e = sample("single_ion_engine.ron");
    let (t, e) = (t.to_str().unwrap(), e.to_str().unwrap());
    let dir = tempfile::tempdir().unwrap();
    let w = write(dir.path(), "w.csv", "t,omega\n0,600000\n1e-5,200000\n");
    let w = w.as_str();
    let out = dir.path().join("o.csv");
    let o = out.to_str().unwrap();
    let cases: &[(&[&str], &str)] = &[
        (&["eval", "--waveform", w, "--occupation", "-1"], "--occupation -1"),
        (&["eval", "--waveform", w, "--occupation", "nan"], "--occupation NaN"),
        (&["eval", "--waveform", w, "--tolerance", "2"], "--tolerance 2"),
        (&["eval", "--waveform", w, "--accuracy", "0"], "--accuracy 0"),
        (&["export", t, "--ramp", "straight line", "--rate", "-5", "--out", o], "--rate -5"),
        (&["export", t, "--ramp", "straight line", "--rate", "inf", "--out", o], "--rate inf"),
        (&["design", "constant-mu", "--from", "100kHz", "--to", "20kHz", "--order", "0"], "--order 0"),
        (&["design", "constant-mu", "--from", "100kHz", "--to", "20kHz", "--near-time", "-3us"], "--near-time -3us"),
        (&["design", "shortcut", "--from", "100kHz", "--to", "20kHz", "--time", "0us"], "--time 0"),
        (&["design", "shortcut", "--from", "100kHz", "--to", "20kHz", "--min-omega2", "nan"], "--min-omega2 NaN"),
        (&["design", "shortcut", "--from", "0Hz", "--to", "20kHz", "--time", "1us"], "--from 0Hz"),
        (&["design", "bang-bang", "--from", "100kHz", "--to", "20kHz", "--min", "10kHz", "--max", "1e400Hz"], "--max"),
        (
            &[
                "design",
                "shortcut",
                "--from",
                "100kHz",
                "--to",
                "20kHz",
                "--time",
                "5us",
                "--waveform-out",
                o,
                "--rate",
                "0",
            ],
            "--rate 0",
        ),
        (&["design", "spline", t, "--ramp", "hand-shaped spline", "--target", "0"], "--target 0"),
        (&["design", "spline", t, "--ramp", "hand-shaped spline", "--max-iterations", "0"], "--max-iterations 0"),
        (
            &["design", "spline", t, "--ramp", "hand-shaped spline", "--robust", "5%", "--band-points", "4"],
            "--band-points 4",
        ),
        (&["sweep", "--waveform", w, "--grid", "1", "--out", o], "--grid 1"),
        (&["sweep", "--waveform", w, "--calibration-error", "95%", "--out", o], "--calibration-error"),
        (&["sweep", "--waveform", w, "--tolerance", "0", "--out", o], "--tolerance 0"),
        (&["play", t, "--ramp", "shortcut 15 us", "--rate", "nan"], "--rate nan: the number must be finite"),
        (&["play", t, "--ramp", "shortcut 15 us", "--bits", "0"], "--bits 0"),
        (&["play", t, "--ramp", "shortcut 15 us", "--slew", "-1"], "--slew -1"),
        (&["play", t, "--ramp", "shortcut 15 us", "--low-pass", "0s"], "--low-pass 0s"),
        (&["play", t, "--ramp", "shortcut 15 us", "--jitter-trials", "0"], "--jitter-trials 0"),
        (&["play", t, "--ramp", "shortcut 15 us", "--jitter", "-1ns"], "--jitter -1ns"),
        (&["play", t, "--ramp", "shortcut 15 us", "--bits", "8", "--full-scale", "0Hz"], "--full-scale 0Hz"),
        (&["tune-cycle", e, "--total", "0s"], "--total 0s"),
        (&["tune-cycle", e, "--max-iterations", "0"], "--max-iterations 0"),
        (
            &[
                "sweep-noise",
                t,
                "--ramp",
                "shortcut 15 us",
                "--max-dephasing",
                "1",
                "--max-amplitude-psd",
                "inf",
                "--out",
                o,
            ],
            "--max-amplitude-psd inf",
        ),
        (
            &[
                "sweep-noise",
                t,
                "--ramp",
                "shortcut 15 us",
                "--max-dephasing",
                "1",
                "--max-amplitude-psd",
                "1",
                "--grid",
                "1000",
                "--out",
                o,
            ],
            "--grid 1000",
        ),
        (
            &[
                "sweep-noise",
                "--waveform",
                w,
                "--occupation",
                "-2",
                "--max-dephasing",
                "1",
                "--max-amplitude-psd",
                "1e-9",
                "--out",
                o,
            ],
            "--occupation -2",
        ),
    ];
    for (args, needle) in cases {
        fails_with(args, needle);
    }
    // A cycle from flags, with one flag at a time out of range.
    let base = [
        "cycle",
        "--hot-freq",
        "200kHz",
        "--cold-freq",
        "80kHz",
        "--hot-occupation",
        "4",
        "--cold-occupation",
        "1",
        "--hot-rate",
        "1",
        "--cold-rate",
        "1",
        "--hot-time",
        "1us",
        "--cold-time",
        "1us",
        "--expand",
        "adiabatic",
        "--expand-time",
        "1us",
        "--compress",
        "adiabatic",
        "--compress-time",
        "1us",
    ];
    let bad_cycle: &[(&[&str], &str)] = &[
        (&["--hot-freq", "0Hz"], "--hot-freq 0"),
        (&["--hot-rate", "-1"], "--hot-rate -1"),
        (&["--cold-occupation", "-3"], "--cold-occupation -3"),
        (&["--hot-time", "-1us"], "--hot-time -1us"),
    ];
    for (change, needle) in bad_cycle {
        let mut args = base;
        let k = args.iter().position(|a| *a == change[0]).unwrap();
        args[k + 1] = change[1];
        fails_with(&args, needle);
    }
    assert!(!out.exists(), "no output file is written for a refused command");
}

/// A slew violation is reported in the unit the limit is stated in. A constant-mu ramp
/// has d omega/dt = mu omega² (the definition of mu: Rezek and Kosloff, New J. Phys. 8,
/// 83 (2006)), largest at the start of an expansion: mu (2 pi f_i)² / (2 pi) in Hz/s.
#[test]
fn slew_violations_are_in_hz_per_second() {
    let p = sample("tweezer_expansion.ron");
    let all = json(&["eval", p.to_str().unwrap(), "--json"]);
    let c = all.as_array().unwrap().iter().find(|c| c["family"] == "constant-mu").expect("a constant-mu candidate");
    let v = &c["violations"][0];
    assert_eq!(v["kind"], "slew");
    assert_eq!(v["worst_unit"], "Hz/s");
    let d = json(&["design", "constant-mu", "--from", "120kHz", "--to", "15kHz", "--order", "1", "--json"]);
    let mu = d["mu"].as_f64().unwrap().abs();
    let w0 = std::f64::consts::TAU * 120e3;
    let expected = mu * w0 * w0 / std::f64::consts::TAU;
    let worst = v["worst"].as_f64().unwrap();
    assert!((worst / expected - 1.0).abs() < 1e-9, "{worst:e} vs {expected:e} Hz/s");
    // The study's limit is 2e10 Hz/s: the overrun reads as the ratio of like units.
    assert!(worst > 2e10 && worst < 20.0 * 2e10, "{worst:e}");
    let text = String::from_utf8(run(&["eval", p.to_str().unwrap()]).stdout).unwrap();
    assert!(text.contains("Hz/s)"), "{text}");
}

/// Ideal adiabatic strokes change only the cycle time (every expectation scales by
/// the frequency ratio: Rezek and Kosloff, New J. Phys. 8, 83 (2006)), so the power is
/// largest at the shortest stroke allowed: without one there is no optimum and the
/// command says so; with one the work strokes sit on it.
#[test]
fn tune_cycle_adiabatic_needs_a_shortest_stroke() {
    let p = sample("single_ion_engine.ron");
    let p = p.to_str().unwrap();
    fails_with(&["tune-cycle", p, "--family", "ideal", "--free-total"], "no finite optimum");
    fails_with(&["tune-cycle", p, "--family", "adiabatic", "--min-stroke-time", "0us"], "--min-stroke-time 0us");
    let v = json(&["tune-cycle", p, "--family", "adiabatic", "--free-total", "--min-stroke-time", "2us", "--json"]);
    for key in ["expansion_time_s", "compression_time_s"] {
        let t = v[key].as_f64().unwrap();
        assert!((t / 2e-6 - 1.0).abs() < 1e-6, "{key} = {t:e}");
    }
    assert!(v["hot_time_s"].as_f64().unwrap() > 1e-7);
}
