//! Flags with a fixed set of values, as clap value enums mapped onto the
//! engine's own enums (the engine does not depend on clap).

use clap::ValueEnum;
use lamella::angle_colour::{Polarization, Side};
use lamella::colorimetry::GamutMapping;

/// `--side`.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum SideChoice {
    /// Light reflected by the coating.
    Reflect,
    /// Light transmitted through the coating and substrate.
    Transmit,
}

impl From<SideChoice> for Side {
    fn from(c: SideChoice) -> Self {
        match c {
            SideChoice::Reflect => Side::Reflect,
            SideChoice::Transmit => Side::Transmit,
        }
    }
}

/// `--polarization` and `--curves`.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum PolarizationChoice {
    /// The mean of s and p.
    Unpolarized,
    /// s (TE) only.
    S,
    /// p (TM) only.
    P,
}

impl From<PolarizationChoice> for Polarization {
    fn from(c: PolarizationChoice) -> Self {
        match c {
            PolarizationChoice::Unpolarized => Polarization::Unpolarized,
            PolarizationChoice::S => Polarization::S,
            PolarizationChoice::P => Polarization::P,
        }
    }
}

/// `--gamut`.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum GamutChoice {
    /// Clip each channel.
    Clip,
    /// Reduce chroma at constant CIELAB lightness and hue.
    Chroma,
}

impl From<GamutChoice> for GamutMapping {
    fn from(c: GamutChoice) -> Self {
        match c {
            GamutChoice::Clip => GamutMapping::Clip,
            GamutChoice::Chroma => GamutMapping::Chroma,
        }
    }
}

/// `--polarization` where one wave is followed (`field`).
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum WaveChoice {
    /// s (TE): the electric field normal to the plane of incidence.
    S,
    /// p (TM): the electric field in the plane of incidence.
    P,
}

impl WaveChoice {
    /// The engine's polarization number (0 = s, 1 = p).
    pub fn index(self) -> usize {
        match self {
            WaveChoice::S => 0,
            WaveChoice::P => 1,
        }
    }

    /// "s" or "p".
    pub fn name(self) -> &'static str {
        match self {
            WaveChoice::S => "s",
            WaveChoice::P => "p",
        }
    }
}
