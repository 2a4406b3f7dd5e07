//! Flags with a fixed set of values, as clap value enums mapped onto the
//! engine's own enums (the engine does not depend on clap).

use clap::ValueEnum;
use lamella::angle_colour::{Polarization, Side};
use lamella::colorimetry::GamutMapping;
use lamella::optics::aniso::Handedness;

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
    /// Left-handed circular (named by the helix the electric field traces
    /// in space at one instant).
    Left,
    /// Right-handed circular.
    Right,
}

impl From<PolarizationChoice> for Polarization {
    fn from(c: PolarizationChoice) -> Self {
        match c {
            PolarizationChoice::Unpolarized => Polarization::Unpolarized,
            PolarizationChoice::S => Polarization::S,
            PolarizationChoice::P => Polarization::P,
            PolarizationChoice::Left => Polarization::Left,
            PolarizationChoice::Right => Polarization::Right,
        }
    }
}

/// `--analyzer`.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum HandednessChoice {
    /// Passes left-handed circular light.
    Left,
    /// Passes right-handed circular light.
    Right,
}

impl From<HandednessChoice> for Handedness {
    fn from(c: HandednessChoice) -> Self {
        match c {
            HandednessChoice::Left => Handedness::Left,
            HandednessChoice::Right => Handedness::Right,
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
