//! One axis for the anharmonic check, given by its caller: the command line's
//! `trap-check --shape ...` flags or the Python package's `trap_check(shape=...)`
//! keywords. One set of rules: the length a well needs, the mass (the study's particle,
//! else a stand-in for a harmonic well), the axis law, and the start occupation (the
//! study's start state seen on that axis, else the ground state). Messages name each
//! setting as the caller spells it.

use crate::Study;
use crate::convert::{self, AxisToCheck, HARMONIC_CHECK_MASS_KG};
use quenchless_physics::RampShape as _;
use quenchless_physics::anharmonic::WellShape;
use quenchless_physics::axes::occupation_on_axis;
use quenchless_physics::constants::TWO_PI;
use quenchless_physics::ramp::{AxisLaw, Ramp};

/// The shape of the one axis's well.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum GivenShape {
    /// omega² x²/2, no length scale.
    Harmonic,
    /// A Gaussian beam's radial profile, by its waist.
    Gaussian,
    /// A Gaussian beam's axial (Lorentzian) profile, by its Rayleigh range.
    Lorentzian,
}

impl GivenShape {
    /// The shape's word, as both callers spell it.
    pub fn word(self) -> &'static str {
        match self {
            Self::Harmonic => "harmonic",
            Self::Gaussian => "gaussian",
            Self::Lorentzian => "lorentzian",
        }
    }
}

/// What a caller calls each setting, for its messages.
#[derive(Debug, Clone, Copy)]
pub struct AxisNames {
    /// How the shape is named with its word: "--shape" or "shape".
    pub shape: &'static str,
    /// Whether the shape's word is quoted ("shape \"gaussian\"").
    pub quote_shape: bool,
    /// The length ("--length", "length_m").
    pub length: &'static str,
    /// How a length is given, after "the waist w0" ("800nm, 0.8um, 2.4µm, 1mm" or "m").
    pub length_hint: &'static str,
    /// The mass ("--mass", "mass_kg").
    pub mass: &'static str,
    /// How a mass is given ("86.909180527u or 1.443e-25kg", or "a mass in kg").
    pub mass_hint: &'static str,
    /// The gain and offset together ("--gain/--offset", "gain/offset_hz").
    pub law: &'static str,
    /// The offset alone ("--offset", "offset_hz").
    pub offset: &'static str,
    /// The occupation ("--occupation", "occupation").
    pub occupation: &'static str,
}

/// The one axis as given; `None` takes the rule's default.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct GivenAxis {
    /// The well's shape.
    pub shape: GivenShape,
    /// Waist (Gaussian) or Rayleigh range (Lorentzian), m.
    pub length_m: Option<f64>,
    /// Particle mass, kg (default the study's particle).
    pub mass_kg: Option<f64>,
    /// Gain on the ramp's omega² (default 1).
    pub gain: Option<f64>,
    /// Signed ordinary frequency F adding sign(F) (2 pi F)² to omega², Hz (default 0).
    pub offset_hz: Option<f64>,
    /// Mean occupation on the axis's initial trap (default the study's start state on
    /// the axis, else 0).
    pub occupation: Option<f64>,
}

impl GivenAxis {
    /// The axis to check for `ramp` (of `study`, if any), named "given axis".
    ///
    /// # Errors
    /// A message naming the setting: a length missing or not allowed, no mass for an
    /// optical well, a bad law, a bad occupation.
    pub fn to_check(&self, study: Option<&Study>, ramp: &Ramp, names: &AxisNames) -> Result<AxisToCheck, String> {
        let shape = if names.quote_shape {
            format!("{} \"{}\"", names.shape, self.shape.word())
        } else {
            format!("{} {}", names.shape, self.shape.word())
        };
        let well = match (self.shape, self.length_m) {
            (GivenShape::Harmonic, None) => WellShape::Harmonic,
            (GivenShape::Harmonic, Some(_)) => {
                return Err(format!(
                    "{}: not allowed with {shape} (a harmonic well has no length scale)",
                    names.length
                ));
            }
            (GivenShape::Gaussian, Some(w)) => WellShape::Gaussian { waist_m: w },
            (GivenShape::Lorentzian, Some(z)) => WellShape::Lorentzian { rayleigh_range_m: z },
            (s, None) => {
                let what = if s == GivenShape::Gaussian { "waist w0" } else { "Rayleigh range zR" };
                return Err(format!("{}: required with {shape}: the {what} ({})", names.length, names.length_hint));
            }
        };
        let model = study.map(|s| convert::trap_model(&s.trap)).transpose().map_err(|e| e.user_message())?;
        let mass_kg = match (self.mass_kg.or_else(|| model.as_ref().and_then(|m| m.mass_kg)), well) {
            (Some(m), _) => m,
            (None, WellShape::Harmonic) => HARMONIC_CHECK_MASS_KG,
            (None, _) => {
                return Err(format!(
                    "{}: required for an optical well (its depth U = m omega² L²/4 or /2 needs it): {}",
                    names.mass, names.mass_hint
                ));
            }
        };
        let offset_hz = self.offset_hz.unwrap_or(0.0);
        if !offset_hz.is_finite() {
            return Err(format!("{} {offset_hz}: allowed a finite signed frequency", names.offset));
        }
        let law = AxisLaw::new(self.gain.unwrap_or(1.0), offset_hz.signum() * (TWO_PI * offset_hz).powi(2))
            .map_err(|e| format!("{}: {e}", names.law))?;
        let occupation = match (self.occupation, study, &model) {
            (Some(n), _, _) => n,
            (None, Some(s), Some(model)) => {
                let n0 = convert::reference_occupation(&s.initial_state, ramp.omega_initial(), model)
                    .map_err(|e| e.user_message())?;
                let axis = ramp.on_axis(law).map_err(|e| format!("{}: {e}", names.law))?;
                occupation_on_axis(ramp.omega_initial(), n0, axis.omega_initial()).map_err(|e| e.to_string())?
            }
            _ => 0.0,
        };
        if !(occupation.is_finite() && occupation >= 0.0) {
            return Err(format!("{} {occupation}: allowed a finite number >= 0", names.occupation));
        }
        Ok(AxisToCheck { name: "given axis".into(), law, well, mass_kg, occupation })
    }
}
