//! From file units to the physics crate's types, naming the field of every bad value.

use crate::error::{ProfileError, Result};
use crate::study::{
    BathFilling, BathSpec, CandidateRamp, CycleSpec, DriveCalibrationSpec, GeneratorSpec, InitialStateSpec, NoiseSpec,
    RampSpec, SplineShapeSpec, StrokeSpec, Study, TrapSpec,
};
use quenchless_physics::anharmonic::WellShape;
use quenchless_physics::constants::{HBAR, TWO_PI};
use quenchless_physics::cycle::{OttoCycle, WorkStroke};
use quenchless_physics::design::{CycleOptimum, StrokeFamily, bath_temperature};
use quenchless_physics::playback::{DriveCalibration, Jitter, Playback, SamplePoint};
use quenchless_physics::ramp::{
    ConstantMuRamp, LinearRamp, PiecewiseConstantRamp, PolynomialRamp, Ramp, SampledColumn, SampledRamp,
    SampledReading, Segment, ShortcutRamp, SplineRamp, SplineShape, SplineSpace,
};
use quenchless_physics::{Bath, Moments, Noise, TrapLimits};

fn positive(field: &str, v: f64) -> Result<f64> {
    if v.is_finite() && v > 0.0 { Ok(v) } else { Err(ProfileError::invalid(field, v, "a finite number > 0")) }
}

fn non_negative(field: &str, v: f64) -> Result<f64> {
    if v.is_finite() && v >= 0.0 { Ok(v) } else { Err(ProfileError::invalid(field, v, "a finite number >= 0")) }
}

/// Builds the physics ramp of a spec; `field` prefixes error paths.
pub fn ramp_from_spec(spec: &RampSpec, field: &str) -> Result<Ramp> {
    let ph = |e: quenchless_physics::PhysicsError| ProfileError::from_physics(field, &e);
    let f = |name: &str, hz: f64| positive(&format!("{field}.{name}"), hz).map(|v| v * TWO_PI);
    // The three families given by end frequencies and a duration.
    let ends = |from_hz: f64, to_hz: f64, duration_s: f64| -> Result<(f64, f64, f64)> {
        Ok((f("from_hz", from_hz)?, f("to_hz", to_hz)?, positive(&format!("{field}.duration_s"), duration_s)?))
    };
    Ok(match spec {
        RampSpec::Linear { from_hz, to_hz, duration_s } => {
            let (wi, wf, tau) = ends(*from_hz, *to_hz, *duration_s)?;
            Ramp::Linear(LinearRamp::new(wi, wf, tau).map_err(ph)?)
        }
        RampSpec::ConstantMu { from_hz, to_hz, duration_s } => {
            let (wi, wf, tau) = ends(*from_hz, *to_hz, *duration_s)?;
            Ramp::ConstantMu(ConstantMuRamp::with_duration(wi, wf, tau).map_err(ph)?)
        }
        RampSpec::Shortcut { from_hz, to_hz, duration_s } => {
            let (wi, wf, tau) = ends(*from_hz, *to_hz, *duration_s)?;
            Ramp::Shortcut(ShortcutRamp::new(wi, wf, tau).map_err(ph)?)
        }
        RampSpec::Polynomial { omega2_coefficients, duration_s } => Ramp::Polynomial(
            PolynomialRamp::new(omega2_coefficients.clone(), positive(&format!("{field}.duration_s"), *duration_s)?)
                .map_err(ph)?,
        ),
        RampSpec::Holds { from_hz, to_hz, holds } => {
            let mut segs = Vec::with_capacity(holds.len());
            for (k, h) in holds.iter().enumerate() {
                let nu = h.signed_frequency_hz;
                if !nu.is_finite() {
                    return Err(ProfileError::invalid(
                        format!("{field}.holds[{k}].signed_frequency_hz"),
                        nu,
                        "a finite number",
                    ));
                }
                let w = TWO_PI * nu;
                segs.push(Segment {
                    omega2: w * w.abs(),
                    duration: positive(&format!("{field}.holds[{k}].duration_s"), h.duration_s)?,
                });
            }
            Ramp::PiecewiseConstant(
                PiecewiseConstantRamp::new(f("from_hz", *from_hz)?, f("to_hz", *to_hz)?, segs).map_err(ph)?,
            )
        }
        RampSpec::Spline { knots, shape, log_frequency, flat_ends } => {
            let times = knots.iter().map(|k| k.t_s).collect();
            let omegas = knots.iter().map(|k| k.frequency_hz * TWO_PI).collect();
            let shape = match shape {
                SplineShapeSpec::Monotone => SplineShape::Monotone,
                SplineShapeSpec::Smooth => SplineShape::Smooth,
            };
            let space = if *log_frequency { SplineSpace::LogOmega } else { SplineSpace::Omega };
            Ramp::Spline(SplineRamp::new(times, omegas, shape, space, *flat_ends).map_err(ph)?)
        }
        RampSpec::Waveform { omega2_column, hold, times_s, values, end_frequencies_rad_s, .. } => {
            let column = if *omega2_column { SampledColumn::Omega2 } else { SampledColumn::Omega };
            let reading = if *hold { SampledReading::Hold } else { SampledReading::Linear };
            let (t, v) = (times_s.clone(), values.clone());
            Ramp::Sampled(
                match end_frequencies_rad_s {
                    Some((wi, wf)) => SampledRamp::with_stated_ends(t, v, column, reading, *wi, *wf),
                    None => SampledRamp::new(t, v, column, reading),
                }
                .map_err(ph)?,
            )
        }
    })
}

/// The index and physics ramp of the candidate called `name`; `field` names the place
/// that asked (a flag or a field path) in the error, which lists the candidates.
pub fn named_candidate(study: &Study, name: &str, field: &str) -> Result<(usize, Ramp)> {
    let Some((i, c)) = study.candidates.iter().enumerate().find(|(_, c)| c.name == name) else {
        let names: Vec<&str> = study.candidates.iter().map(|c| c.name.as_str()).collect();
        return Err(ProfileError::invalid(
            field,
            format!("\"{name}\" (no such candidate)"),
            format!("the name of one of the study's candidates: {}", names.join(", ")),
        ));
    };
    Ok((i, candidate_ramp(c, i)?))
}

/// The physics ramp of a candidate.
pub fn candidate_ramp(c: &CandidateRamp, index: usize) -> Result<Ramp> {
    ramp_from_spec(&c.ramp, &format!("candidates[{index}] \"{}\"", c.name))
}

/// Initial state at the start frequency omega_i (rad/s).
pub fn initial_state(spec: &InitialStateSpec, omega_i: f64) -> Result<Moments> {
    let ph = |e: quenchless_physics::PhysicsError| ProfileError::from_physics("initial_state", &e);
    match *spec {
        InitialStateSpec::Thermal { occupation } => {
            Moments::thermal_occupation(omega_i, non_negative("initial_state.occupation", occupation)?).map_err(ph)
        }
        InitialStateSpec::ThermalAt { temperature_k } => {
            Moments::thermal_temperature(omega_i, non_negative("initial_state.temperature_k", temperature_k)?)
                .map_err(ph)
        }
        InitialStateSpec::Squeezed { occupation, r, phi } => Moments::squeezed(omega_i, occupation, r, phi).map_err(ph),
        InitialStateSpec::Moments { x_scaled, y_scaled, d_scaled } => {
            Moments::new(x_scaled * HBAR / omega_i, y_scaled * HBAR * omega_i, d_scaled * HBAR).map_err(ph)
        }
    }
}

/// Noise of a study.
pub fn noise(spec: &NoiseSpec) -> Result<Noise> {
    Noise::new(
        non_negative("noise.dephasing_rate_per_s", spec.dephasing_rate_per_s)?,
        non_negative("noise.amplitude_psd_s", spec.amplitude_psd_s)?,
    )
    .map_err(|e| ProfileError::from_physics("noise", &e))
}

/// Stated limits of the trap, in rad/s.
pub fn limits(trap: &TrapSpec) -> Result<TrapLimits> {
    let opt =
        |name: &str, v: Option<f64>| v.map(|x| positive(&format!("trap.{name}"), x).map(|x| x * TWO_PI)).transpose();
    TrapLimits::new(
        opt("lowest_frequency_hz", trap.lowest_frequency_hz)?,
        opt("highest_frequency_hz", trap.highest_frequency_hz)?,
        opt("slew_limit_hz_per_s", trap.slew_limit_hz_per_s)?,
    )
    .map_err(|e| ProfileError::from_physics("trap", &e))
}

/// The drive calibration of a generator section (physics units: rad/s).
pub fn drive_calibration(spec: &DriveCalibrationSpec) -> Result<DriveCalibration> {
    let field = "generator.drive.calibration";
    let c = match spec {
        DriveCalibrationSpec::FrequencySquared { reference_frequency_hz, drive_at_reference } => {
            let w = positive(&format!("{field}.reference_frequency_hz"), *reference_frequency_hz)? * TWO_PI;
            let d = positive(&format!("{field}.drive_at_reference"), *drive_at_reference)?;
            DriveCalibration::Omega2 { gain: d / (w * w) }
        }
        DriveCalibrationSpec::Table { frequency_hz, drive } => {
            DriveCalibration::Table { omega: frequency_hz.iter().map(|f| f * TWO_PI).collect(), drive: drive.clone() }
        }
    };
    c.validate().map_err(|e| ProfileError::from_physics(field, &e))?;
    Ok(c)
}

/// How the study's generator plays a ramp (clock jitter from seed 0). Quantises only
/// with a drive section, whose full scale is the range. The generator's rules are the
/// physics crate's ([`Playback::validate`]); errors name the field of this section.
pub fn playback(g: &GeneratorSpec) -> Result<Playback> {
    let mut pb = Playback {
        point: if g.midpoint_samples { SamplePoint::Midpoint } else { SamplePoint::Left },
        slew: g.slew_limit_per_s,
        low_pass: g.low_pass_s,
        jitter: g.jitter_rms_s.map(|rms| Jitter { rms, seed: 0 }),
        ..Playback::sample_and_hold(g.sample_rate_per_s)
    };
    if let Some(d) = &g.drive {
        drive_section(d)?;
        pb.calibration = drive_calibration(&d.calibration)?;
        pb.allows_negative = d.can_go_negative;
        pb.quantisation = g.bits.map(|bits| (bits, d.full_scale_low, d.full_scale_high));
    }
    pb.validate().map_err(|e| generator_error(&e))?;
    if let (Some(bits), None) = (g.bits, &g.drive) {
        // Without a drive section there is no full-scale range: the bit depth is kept
        // (format 1 stated it alone) but nothing is quantised. It must still be one the
        // generator could have, by the same rule over a stand-in range.
        Playback { quantisation: Some((bits, 0.0, 1.0)), ..pb.clone() }.validate().map_err(|e| generator_error(&e))?;
    }
    if let Some(m) = g.max_rate_per_s
        && !(m.is_finite() && m >= pb.rate)
    {
        return Err(ProfileError::invalid(
            GeneratorField::MaxRate.path(),
            m,
            format!("a finite number of samples per second >= the sample rate, {:e} samples per second", pb.rate),
        ));
    }
    Ok(pb)
}

/// The drive section's own rules: a finite full scale, highest above lowest, and a
/// unit that fits in a file header.
fn drive_section(d: &crate::study::DriveSpec) -> Result<()> {
    for (name, v) in [("full_scale_low", d.full_scale_low), ("full_scale_high", d.full_scale_high)] {
        if !v.is_finite() {
            return Err(ProfileError::invalid(format!("generator.drive.{name}"), v, "a finite drive"));
        }
    }
    if d.full_scale_high <= d.full_scale_low {
        return Err(ProfileError::invalid(
            GeneratorField::FullScaleHigh.path(),
            d.full_scale_high,
            format!("above full_scale_low ({})", d.full_scale_low),
        ));
    }
    if d.unit.trim().is_empty() || d.unit.len() > 32 || d.unit.contains([',', '\n', '[', ']']) {
        return Err(ProfileError::invalid(
            "generator.drive.unit",
            format!("\"{}\"", d.unit),
            "1 to 32 characters without commas, brackets or line breaks",
        ));
    }
    Ok(())
}

/// The fields of the generator section a command-line flag can set, so a caller can
/// tell which of its flags an error is about.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum GeneratorField {
    /// `generator.sample_rate_per_s`.
    SampleRate,
    /// `generator.bits`.
    Bits,
    /// `generator.slew_limit_per_s`.
    Slew,
    /// `generator.low_pass_s`.
    LowPass,
    /// `generator.jitter_rms_s`.
    Jitter,
    /// `generator.max_rate_per_s`.
    MaxRate,
    /// `generator.drive.full_scale_high`.
    FullScaleHigh,
    /// `generator.drive.calibration`.
    Calibration,
}

impl GeneratorField {
    const ALL: [Self; 8] = [
        Self::SampleRate,
        Self::Bits,
        Self::Slew,
        Self::LowPass,
        Self::Jitter,
        Self::MaxRate,
        Self::FullScaleHigh,
        Self::Calibration,
    ];

    /// The field path in a study file.
    pub fn path(self) -> &'static str {
        match self {
            Self::SampleRate => "generator.sample_rate_per_s",
            Self::Bits => "generator.bits",
            Self::Slew => "generator.slew_limit_per_s",
            Self::LowPass => "generator.low_pass_s",
            Self::Jitter => "generator.jitter_rms_s",
            Self::MaxRate => "generator.max_rate_per_s",
            Self::FullScaleHigh => "generator.drive.full_scale_high",
            Self::Calibration => "generator.drive.calibration",
        }
    }

    /// The field an error of [`playback`] names, if it is one of these.
    pub fn of_error(e: &ProfileError) -> Option<Self> {
        let ProfileError::Invalid { field, .. } = e else { return None };
        Self::ALL.into_iter().find(|f| field == f.path() || field.starts_with(&format!("{} (", f.path())))
    }
}

/// A physics error of [`Playback::validate`] as an error of the generator section's
/// field; what is allowed is said in the field's units.
fn generator_error(e: &quenchless_physics::PhysicsError) -> ProfileError {
    let quenchless_physics::PhysicsError::InvalidParameter { name, value, allowed } = e else {
        return ProfileError::invalid("generator", "", e.to_string());
    };
    let (field, allowed) = match name.as_str() {
        "sample rate" => (GeneratorField::SampleRate, "a finite number of samples per second > 0".to_string()),
        "bits" => (GeneratorField::Bits, allowed.clone()),
        "slew limit" => (GeneratorField::Slew, "a finite number of drive units per second > 0".to_string()),
        "low-pass time constant" => (GeneratorField::LowPass, "a finite time > 0".to_string()),
        "clock jitter rms" => (GeneratorField::Jitter, allowed.clone()),
        "quantisation" => (GeneratorField::FullScaleHigh, allowed.clone()),
        n if n.starts_with("drive calibration") => {
            return ProfileError::invalid(
                format!("{} ({n})", GeneratorField::Calibration.path()),
                value,
                allowed.clone(),
            );
        }
        n => return ProfileError::invalid(format!("generator ({n})"), value, allowed.clone()),
    };
    ProfileError::invalid(field.path(), value, allowed)
}

fn bath(spec: &BathSpec, field: &str) -> Result<Bath> {
    let w = positive(&format!("{field}.frequency_hz"), spec.frequency_hz)? * TWO_PI;
    let rate = non_negative(&format!("{field}.rate_per_s"), spec.rate_per_s)?;
    non_negative(&format!("{field}.time_s"), spec.time_s)?;
    let b = match spec.filling {
        BathFilling::Occupation(n) => Bath::with_occupation(w, non_negative(&format!("{field}.filling"), n)?, rate),
        BathFilling::TemperatureK(t) => Bath::with_temperature(w, non_negative(&format!("{field}.filling"), t)?, rate),
    };
    b.map_err(|e| ProfileError::from_physics(field, &e))
}

fn stroke(study: &Study, spec: &StrokeSpec, field: &str) -> Result<WorkStroke> {
    Ok(match spec {
        StrokeSpec::Candidate(name) => WorkStroke::Ramp(named_candidate(study, name, field)?.1),
        StrokeSpec::Sudden { hold_s } => {
            WorkStroke::Sudden { hold: non_negative(&format!("{field}.hold_s"), *hold_s)? }
        }
        StrokeSpec::IdealAdiabatic { time_s } => {
            WorkStroke::IdealAdiabatic { time: non_negative(&format!("{field}.time_s"), *time_s)? }
        }
        StrokeSpec::Ramp(r) => WorkStroke::Ramp(ramp_from_spec(r, field)?),
    })
}

/// The physics cycle of a study's cycle spec.
pub fn cycle(study: &Study, spec: &CycleSpec) -> Result<OttoCycle> {
    let c = OttoCycle {
        hot: bath(&spec.hot, "cycle.hot")?,
        hot_time: spec.hot.time_s,
        expansion: stroke(study, &spec.expansion, "cycle.expansion")?,
        cold: bath(&spec.cold, "cycle.cold")?,
        cold_time: spec.cold.time_s,
        compression: stroke(study, &spec.compression, "cycle.compression")?,
        noise: noise(&study.noise)?,
    };
    c.validate().map_err(|e| ProfileError::from_physics("cycle", &e))?;
    Ok(c)
}

/// Checks every field of a study (used after loading and before saving).
pub fn validate(study: &Study) -> Result<()> {
    if study.format_version == 0 || study.format_version > crate::study::FORMAT_VERSION {
        return Err(ProfileError::invalid(
            "format_version",
            study.format_version,
            format!("{} to {}", crate::study::OLDEST_FORMAT_VERSION, crate::study::FORMAT_VERSION),
        ));
    }
    let wi = positive("trap.start_frequency_hz", study.trap.start_frequency_hz)? * TWO_PI;
    positive("trap.end_frequency_hz", study.trap.end_frequency_hz)?;
    limits(&study.trap)?;
    let model = trap_model(&study.trap)?;
    if model.is_multi_axis() {
        reference_occupation(&study.initial_state, wi, &model)?;
    }
    if let Some(g) = &study.generator {
        playback(g)?;
    }
    initial_state(&study.initial_state, wi)?;
    noise(&study.noise)?;
    if !(study.tolerance.is_finite() && study.tolerance > 0.0 && study.tolerance < 1.0) {
        return Err(ProfileError::invalid("tolerance", study.tolerance, "a number in (0, 1)"));
    }
    for (i, c) in study.candidates.iter().enumerate() {
        if c.name.trim().is_empty() {
            return Err(ProfileError::invalid(format!("candidates[{i}].name"), "\"\"", "a non-empty name"));
        }
        if study.candidates[..i].iter().any(|o| o.name == c.name) {
            return Err(ProfileError::invalid(
                format!("candidates[{i}].name"),
                format!("\"{}\"", c.name),
                "a name not used by another candidate",
            ));
        }
        candidate_ramp(c, i)?;
    }
    if let Some(c) = &study.cycle {
        cycle(study, c)?;
    }
    Ok(())
}

/// The study's stroke of a design family between two frequencies (rad/s) taking
/// `time` seconds.
pub fn family_stroke(f: StrokeFamily, from: f64, to: f64, time: f64) -> StrokeSpec {
    let (from_hz, to_hz, duration_s) = (from / TWO_PI, to / TWO_PI, time);
    match f {
        StrokeFamily::Linear => StrokeSpec::Ramp(RampSpec::Linear { from_hz, to_hz, duration_s }),
        StrokeFamily::ConstantMu => StrokeSpec::Ramp(RampSpec::ConstantMu { from_hz, to_hz, duration_s }),
        StrokeFamily::Shortcut => StrokeSpec::Ramp(RampSpec::Shortcut { from_hz, to_hz, duration_s }),
        StrokeFamily::IdealAdiabatic => StrokeSpec::IdealAdiabatic { time_s: time },
    }
}

/// The cycle section of a power-optimal split found from `start`: its stroke times,
/// work strokes of `family`, and with `vary_ratio` the cold bath moved to the optimal
/// frequency at the same temperature.
pub fn optimum_cycle_spec(start: &CycleSpec, best: &CycleOptimum, family: StrokeFamily, vary_ratio: bool) -> CycleSpec {
    let [th, te, tc, tk] = best.stroke_times;
    let (wh, wc) = (best.cycle.hot.omega(), best.cycle.cold.omega());
    let mut new = start.clone();
    new.hot.time_s = th;
    new.cold.time_s = tc;
    if vary_ratio {
        new.cold.frequency_hz = wc / TWO_PI;
        new.cold.filling = BathFilling::TemperatureK(bath_temperature(&best.cycle.cold));
    }
    new.expansion = family_stroke(family, wh, wc, te);
    new.compression = family_stroke(family, wc, wh, tk);
    new
}

/// A well shape in words for reports: "harmonic", "Gaussian (w0 = 800 nm)".
pub fn well_words(well: &WellShape) -> String {
    use crate::units::{Quantity, format_quantity};
    match *well {
        WellShape::Harmonic => "harmonic".into(),
        WellShape::Gaussian { waist_m } => format!("Gaussian (w0 = {})", format_quantity(waist_m, Quantity::Length)),
        WellShape::Lorentzian { rayleigh_range_m } => {
            format!("Lorentzian (zR = {})", format_quantity(rayleigh_range_m, Quantity::Length))
        }
    }
}

/// One axis of the study's trap model.
#[derive(Debug, Clone, PartialEq)]
pub struct ModelAxis {
    /// Name, law and limits.
    pub axis: quenchless_physics::axes::TrapAxis,
    /// Its well (a tweezer in the file becomes its two axes).
    pub well: WellShape,
}

/// The study's trap as the physics needs it: the particle's mass (if stated) and every
/// axis, the reference axis first.
#[derive(Debug, Clone, PartialEq)]
pub struct TrapModel {
    /// Mass, kg.
    pub mass_kg: Option<f64>,
    /// The axes; `axes[0]` is the reference axis (gain 1, offset 0).
    pub axes: Vec<ModelAxis>,
}

impl TrapModel {
    /// Whether the control moves more than one axis.
    pub fn is_multi_axis(&self) -> bool {
        self.axes.len() > 1
    }

    /// The physics axes, reference first.
    pub fn trap_axes(&self) -> Vec<quenchless_physics::axes::TrapAxis> {
        self.axes.iter().map(|a| a.axis.clone()).collect()
    }
}

/// The particle's mass, kg.
pub fn particle_mass(spec: &crate::study::ParticleSpec, field: &str) -> Result<f64> {
    use crate::study::ParticleSpec;
    let range = |v: f64| v.is_finite() && (1e-32..=1e-20).contains(&v);
    match spec {
        ParticleSpec::MassU(u) => {
            let kg = u * crate::units::ATOMIC_MASS_UNIT_KG;
            if range(kg) { Ok(kg) } else { Err(ProfileError::invalid(field, u, "a mass from 6e-6 u to 6e6 u")) }
        }
        ParticleSpec::MassKg(kg) => {
            if range(*kg) {
                Ok(*kg)
            } else {
                Err(ProfileError::invalid(field, kg, "a mass from 1e-32 kg to 1e-20 kg"))
            }
        }
        ParticleSpec::Species(name) => crate::species::mass_kg(name).ok_or_else(|| {
            ProfileError::invalid(
                field,
                format!("\"{name}\" (not a species this build knows)"),
                format!("one of {}, or a mass in u or kg", crate::species::names().join(", ")),
            )
        }),
    }
}

/// One axis of the file, expanded into `axes` (a tweezer adds its axial axis after it).
fn expand_axis(
    axes: &mut Vec<ModelAxis>,
    field: &str,
    name: &str,
    law: quenchless_physics::ramp::AxisLaw,
    limits: TrapLimits,
    well: &crate::study::WellSpec,
) -> Result<()> {
    use crate::study::{TweezerAxialSpec, WellSpec};
    use quenchless_physics::axes::TrapAxis;
    use quenchless_physics::ramp::AxisLaw;

    let length = |what: &str, v: f64| -> Result<f64> {
        if v.is_finite() && (1e-9..=1.0).contains(&v) {
            Ok(v)
        } else {
            Err(ProfileError::invalid(format!("{field}.well.{what}"), v, "a length from 1e-9 m (1 nm) to 1 m"))
        }
    };
    let named = |n: &str| -> Result<String> {
        if n.trim().is_empty() {
            Err(ProfileError::invalid(format!("{field}.name"), "\"\"", "a non-empty name"))
        } else {
            Ok(n.trim().to_string())
        }
    };
    let mut add = |name: String, law: AxisLaw, limits: TrapLimits, well: WellShape| {
        axes.push(ModelAxis { axis: TrapAxis { name, law, limits }, well });
    };
    match *well {
        WellSpec::Harmonic => add(named(name)?, law, limits, WellShape::Harmonic),
        WellSpec::Gaussian { waist_m } => {
            add(named(name)?, law, limits, WellShape::Gaussian { waist_m: length("waist_m", waist_m)? });
        }
        WellSpec::Lorentzian { rayleigh_range_m } => add(
            named(name)?,
            law,
            limits,
            WellShape::Lorentzian { rayleigh_range_m: length("rayleigh_range_m", rayleigh_range_m)? },
        ),
        WellSpec::Tweezer { waist_m, axial, ref axial_name } => {
            let w0 = length("waist_m", waist_m)?;
            let z_r = match axial {
                TweezerAxialSpec::Wavelength(lambda) => {
                    let lambda = length("axial.Wavelength", lambda)?;
                    if lambda >= w0 * std::f64::consts::PI {
                        return Err(ProfileError::invalid(
                            format!("{field}.well.axial.Wavelength"),
                            lambda,
                            format!(
                                "well below pi times the waist ({:e} m) for a paraxial beam",
                                w0 * std::f64::consts::PI
                            ),
                        ));
                    }
                    std::f64::consts::PI * w0 * w0 / lambda
                }
                TweezerAxialSpec::FrequencyRatio(r) => {
                    if !(r.is_finite() && r > 0.0 && r < 1.0) {
                        return Err(ProfileError::invalid(
                            format!("{field}.well.axial.FrequencyRatio"),
                            r,
                            "a ratio nu_axial/nu_radial in (0, 1)",
                        ));
                    }
                    w0 / (r * std::f64::consts::SQRT_2)
                }
            };
            let ratio2 = w0 * w0 / (2.0 * z_r * z_r);
            add(named(name)?, law, limits, WellShape::Gaussian { waist_m: w0 });
            let axial_law = AxisLaw::new(law.gain * ratio2, law.offset_omega2 * ratio2)
                .map_err(|e| ProfileError::from_physics(field, &e))?;
            add(named(axial_name)?, axial_law, TrapLimits::default(), WellShape::Lorentzian { rayleigh_range_m: z_r });
        }
    }
    Ok(())
}

/// The study's trap model: one harmonic axis without a `trap.model`.
pub fn trap_model(trap: &TrapSpec) -> Result<TrapModel> {
    use crate::study::WellSpec;
    use quenchless_physics::axes::TrapAxis;
    use quenchless_physics::ramp::AxisLaw;
    let reference_limits = limits(trap)?;
    let Some(model) = &trap.model else {
        return Ok(TrapModel {
            mass_kg: None,
            axes: vec![ModelAxis {
                axis: TrapAxis { name: "reference".into(), law: AxisLaw::IDENTITY, limits: reference_limits },
                well: WellShape::Harmonic,
            }],
        });
    };
    let mass_kg = model.particle.as_ref().map(|p| particle_mass(p, "trap.model.particle")).transpose()?;
    let mut axes: Vec<ModelAxis> = Vec::new();
    let mut push = |field: &str, name: &str, law: AxisLaw, limits: TrapLimits, well: &WellSpec| {
        expand_axis(&mut axes, field, name, law, limits, well)
    };
    push("trap.model", &model.reference_name, AxisLaw::IDENTITY, reference_limits, &model.reference_well)?;
    for (i, a) in model.axes.iter().enumerate() {
        let field = format!("trap.model.axes[{i}]");
        if !a.offset_hz.is_finite() || a.offset_hz.abs() > 1e29 {
            return Err(ProfileError::invalid(
                format!("{field}.offset_hz"),
                a.offset_hz,
                "a finite signed frequency, Hz",
            ));
        }
        let offset = a.offset_hz.signum() * (TWO_PI * a.offset_hz).powi(2);
        let law = AxisLaw::new(a.gain, offset).map_err(|e| ProfileError::from_physics(&field, &e))?;
        let opt = |name: &str, v: Option<f64>| {
            v.map(|x| positive(&format!("{field}.{name}"), x).map(|x| x * TWO_PI)).transpose()
        };
        let lim = TrapLimits::new(
            opt("lowest_frequency_hz", a.lowest_frequency_hz)?,
            opt("highest_frequency_hz", a.highest_frequency_hz)?,
            None,
        )
        .map_err(|e| ProfileError::from_physics(&field, &e))?;
        push(&field, &a.name, law, lim, &a.well)?;
    }
    for (i, a) in axes.iter().enumerate() {
        if axes[..i].iter().any(|o| o.axis.name == a.axis.name) {
            return Err(ProfileError::invalid(
                "trap.model axis names",
                format!("\"{}\" twice", a.axis.name),
                "a different name for every axis (a tweezer adds its axial axis by its own name)",
            ));
        }
    }
    if mass_kg.is_none()
        && let Some(a) = axes.iter().find(|a| a.well != WellShape::Harmonic)
    {
        return Err(ProfileError::invalid(
            "trap.model.particle",
            "(missing)",
            format!(
                "a mass or species: the {} well of the {} axis needs it for its depth",
                well_words(&a.well),
                a.axis.name
            ),
        ));
    }
    Ok(TrapModel { mass_kg, axes })
}

/// The start occupation on the reference axis for a multi-axis study (thermal starts
/// only: each axis's occupation follows from one temperature).
pub fn reference_occupation(spec: &InitialStateSpec, omega_i: f64, model: &TrapModel) -> Result<f64> {
    match *spec {
        InitialStateSpec::Thermal { occupation } => non_negative("initial_state.occupation", occupation),
        InitialStateSpec::ThermalAt { temperature_k } => {
            let t = non_negative("initial_state.temperature_k", temperature_k)?;
            quenchless_physics::state::bose_einstein(omega_i, t)
                .map_err(|e| ProfileError::from_physics("initial_state", &e))
        }
        _ if model.is_multi_axis() => Err(ProfileError::invalid(
            "initial_state",
            "a squeezed or moment start",
            format!(
                "a thermal start (occupation or temperature) when the trap has {} axes: a squeezed or \
                 moment state is given for one axis, and the others' states would be unknown",
                model.axes.len()
            ),
        )),
        _ => Err(ProfileError::invalid("initial_state", "a squeezed or moment start", "a thermal start")),
    }
}

/// One axis of a study's trap, ready for the anharmonic check.
#[derive(Debug, Clone, PartialEq)]
pub struct AxisToCheck {
    /// The axis's name.
    pub name: String,
    /// How it follows the drawn ramp.
    pub law: quenchless_physics::ramp::AxisLaw,
    /// Its well.
    pub well: WellShape,
    /// The particle's mass, kg (any mass for harmonic axes: their results do not depend
    /// on it).
    pub mass_kg: f64,
    /// Mean occupation of its start state (from the common temperature).
    pub occupation: f64,
}

/// The mass a harmonic check uses when none is stated, kg: 100 u (a harmonic check's
/// results are functions of omega(t) alone, so any positive mass gives the same).
pub const HARMONIC_CHECK_MASS_KG: f64 = 100.0 * crate::units::ATOMIC_MASS_UNIT_KG;

/// Every axis of the study's trap model for the anharmonic check of `ramp`; refused
/// when the study states no model (there is then no well to check in).
pub fn axes_to_check(study: &Study, ramp: &Ramp) -> Result<Vec<AxisToCheck>> {
    use quenchless_physics::RampShape as _;
    if study.trap.model.is_none() {
        return Err(ProfileError::invalid(
            "trap.model",
            "(none)",
            "a trap model with the wells to check in (particle, axes and well shapes)",
        ));
    }
    let model = trap_model(&study.trap)?;
    let n0 = reference_occupation(&study.initial_state, ramp.omega_initial(), &model)?;
    model
        .axes
        .iter()
        .map(|m| {
            let field = format!("trap.model axis \"{}\"", m.axis.name);
            let axis = ramp.on_axis(m.axis.law).map_err(|e| ProfileError::from_physics(&field, &e))?;
            let occupation =
                quenchless_physics::axes::occupation_on_axis(ramp.omega_initial(), n0, axis.omega_initial())
                    .map_err(|e| ProfileError::from_physics(&field, &e))?;
            Ok(AxisToCheck {
                name: m.axis.name.clone(),
                law: m.axis.law,
                well: m.well,
                mass_kg: model.mass_kg.unwrap_or(HARMONIC_CHECK_MASS_KG),
                occupation,
            })
        })
        .collect()
}
