//! The four feedback topologies and what they imply for units and impedances.
//!
//! Named mixing-first (series-shunt: series mixing at the input, shunt sampling at
//! the output) or, in the other family, sampling-first (voltage-series: voltage
//! sampled, series mixing). Both name the same four circuits:
//!
//! | mixing–sampling | sampling–mixing | amplifier kind   | A    | β    |
//! |-----------------|-----------------|------------------|------|------|
//! | series-shunt    | voltage-series  | voltage          | V/V  | V/V  |
//! | shunt-series    | current-shunt   | current          | A/A  | A/A  |
//! | series-series   | current-series  | transconductance | A/V  | V/A  |
//! | shunt-shunt     | voltage-shunt   | transresistance  | V/A  | A/V  |
//!
//! Source: the standard classification of feedback amplifiers, e.g. Sedra & Smith,
//! *Microelectronic Circuits*, 7th ed., ch. 10 (from memory).

use crate::error::{Error, Result};
use core::fmt;
use core::str::FromStr;

/// How the fed-back signal is combined with the source at the input port.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "lowercase"))]
pub enum Mixing {
    /// In series with the source (a voltage is subtracted): input impedance × D.
    Series,
    /// In parallel with the source (a current is subtracted): input impedance ÷ D.
    Shunt,
}

/// What the feedback network senses at the output port.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "lowercase"))]
pub enum Sampling {
    /// Shunt sampling of the output voltage: output impedance ÷ D.
    Voltage,
    /// Series sampling of the output current: output impedance × D.
    Current,
}

/// One of the four negative-feedback topologies.
///
/// Parse it from either naming family, case-insensitively, with `-`, `_` or a space
/// between the words; the amplifier kind ("voltage", "current", "transconductance",
/// "transresistance") is accepted too.
///
/// # Example
/// ```
/// use loopwright::feedback::Topology;
/// assert_eq!("Current_Shunt".parse::<Topology>(), Ok(Topology::ShuntSeries));
/// assert_eq!("transresistance".parse::<Topology>(), Ok(Topology::ShuntShunt));
/// assert_eq!("series-parallel".parse::<Topology>().unwrap_err().code(), "unknown_name");
/// ```
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "kebab-case"))]
pub enum Topology {
    /// Series mixing, shunt (voltage) sampling: voltage amplifier, A and β in V/V.
    SeriesShunt,
    /// Shunt mixing, series (current) sampling: current amplifier, A and β in A/A.
    ShuntSeries,
    /// Series mixing, series (current) sampling: transconductance, A in A/V, β in V/A.
    SeriesSeries,
    /// Shunt mixing, shunt (voltage) sampling: transresistance, A in V/A, β in A/V.
    ShuntShunt,
}

/// The accepted names, for error messages and help text.
pub const TOPOLOGY_NAMES: &str = "series-shunt, shunt-series, series-series, shunt-shunt, \
voltage-series, current-shunt, current-series, voltage-shunt, voltage, current, \
transconductance, transresistance";

impl Topology {
    /// All four, in catalog order.
    pub const ALL: [Topology; 4] = [
        Topology::SeriesShunt,
        Topology::ShuntSeries,
        Topology::SeriesSeries,
        Topology::ShuntShunt,
    ];

    /// The mixing–sampling name, e.g. `"series-shunt"`.
    pub const fn name(self) -> &'static str {
        match self {
            Topology::SeriesShunt => "series-shunt",
            Topology::ShuntSeries => "shunt-series",
            Topology::SeriesSeries => "series-series",
            Topology::ShuntShunt => "shunt-shunt",
        }
    }

    /// The sampling–mixing name, e.g. `"voltage-series"`.
    pub const fn sampling_mixing_name(self) -> &'static str {
        match self {
            Topology::SeriesShunt => "voltage-series",
            Topology::ShuntSeries => "current-shunt",
            Topology::SeriesSeries => "current-series",
            Topology::ShuntShunt => "voltage-shunt",
        }
    }

    /// The kind of amplifier the closed loop makes.
    pub const fn amplifier_kind(self) -> &'static str {
        match self {
            Topology::SeriesShunt => "voltage",
            Topology::ShuntSeries => "current",
            Topology::SeriesSeries => "transconductance",
            Topology::ShuntShunt => "transresistance",
        }
    }

    /// Input mixing.
    pub const fn mixing(self) -> Mixing {
        match self {
            Topology::SeriesShunt | Topology::SeriesSeries => Mixing::Series,
            Topology::ShuntSeries | Topology::ShuntShunt => Mixing::Shunt,
        }
    }

    /// Output sampling.
    pub const fn sampling(self) -> Sampling {
        match self {
            Topology::SeriesShunt | Topology::ShuntShunt => Sampling::Voltage,
            Topology::ShuntSeries | Topology::SeriesSeries => Sampling::Current,
        }
    }

    /// Unit of the open- and closed-loop gain A and Af: output quantity per input
    /// quantity (V/V, A/A, A/V or V/A).
    pub const fn gain_unit(self) -> &'static str {
        match self {
            Topology::SeriesShunt => "V/V",
            Topology::ShuntSeries => "A/A",
            Topology::SeriesSeries => "A/V",
            Topology::ShuntShunt => "V/A",
        }
    }

    /// Unit of the feedback factor β, the reciprocal of [`Topology::gain_unit`] so
    /// that the loop gain Aβ is dimensionless.
    pub const fn beta_unit(self) -> &'static str {
        match self {
            Topology::SeriesShunt => "V/V",
            Topology::ShuntSeries => "A/A",
            Topology::SeriesSeries => "V/A",
            Topology::ShuntShunt => "A/V",
        }
    }
}

impl fmt::Display for Topology {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.name())
    }
}

/// True when `input` spells `canonical` up to ASCII case, with `-`, `_` and
/// spaces counted as the same separator and surrounding blanks ignored.
fn same_name(input: &str, canonical: &str) -> bool {
    let norm = |c: char| match c {
        '_' | ' ' => '-',
        c => c.to_ascii_lowercase(),
    };
    input.trim().chars().map(norm).eq(canonical.chars())
}

impl FromStr for Topology {
    type Err = Error;

    /// # Errors
    /// [`Error::UnknownName`] with `param = "topology"`.
    fn from_str(s: &str) -> Result<Self> {
        const ALIASES: [(&str, Topology); 12] = [
            ("series-shunt", Topology::SeriesShunt),
            ("voltage-series", Topology::SeriesShunt),
            ("voltage", Topology::SeriesShunt),
            ("shunt-series", Topology::ShuntSeries),
            ("current-shunt", Topology::ShuntSeries),
            ("current", Topology::ShuntSeries),
            ("series-series", Topology::SeriesSeries),
            ("current-series", Topology::SeriesSeries),
            ("transconductance", Topology::SeriesSeries),
            ("shunt-shunt", Topology::ShuntShunt),
            ("voltage-shunt", Topology::ShuntShunt),
            ("transresistance", Topology::ShuntShunt),
        ];
        ALIASES
            .iter()
            .find(|(name, _)| same_name(s, name))
            .map(|&(_, t)| t)
            .ok_or(Error::UnknownName {
                param: "topology",
                expected: TOPOLOGY_NAMES,
            })
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn both_families_name_the_same_topology() {
        for t in Topology::ALL {
            assert_eq!(t.name().parse::<Topology>(), Ok(t));
            assert_eq!(t.sampling_mixing_name().parse::<Topology>(), Ok(t));
            assert_eq!(t.amplifier_kind().parse::<Topology>(), Ok(t));
        }
    }

    #[test]
    fn parsing_ignores_case_separators_and_blanks() {
        assert_eq!(
            " SERIES SHUNT ".parse::<Topology>(),
            Ok(Topology::SeriesShunt)
        );
        assert_eq!(
            "Voltage_Shunt".parse::<Topology>(),
            Ok(Topology::ShuntShunt)
        );
        assert_eq!(
            "current-SERIES".parse::<Topology>(),
            Ok(Topology::SeriesSeries)
        );
    }

    #[test]
    fn unknown_and_near_miss_names_are_rejected() {
        for bad in [
            "",
            "-",
            "series",
            "series-shunt-x",
            "seriesshunt",
            "shunt–series",
            "voltage-voltage",
        ] {
            let e = bad.parse::<Topology>().unwrap_err();
            assert_eq!(
                (e.code(), e.param()),
                ("unknown_name", "topology"),
                "input {bad:?}"
            );
        }
    }

    #[test]
    fn loop_gain_is_dimensionless_for_every_topology() {
        // A in X/Y times β in Y/X: the unit strings are reciprocal.
        for t in Topology::ALL {
            let (num, den) = t.gain_unit().split_once('/').unwrap();
            assert_eq!(t.beta_unit(), alloc::format!("{den}/{num}"));
        }
    }

    #[test]
    fn mixing_and_sampling_follow_the_name() {
        // Common practice, no source: the first word is the input mixing, the
        // second the output connection (shunt = voltage sampled, series = current).
        assert_eq!(Topology::SeriesShunt.mixing(), Mixing::Series);
        assert_eq!(Topology::SeriesShunt.sampling(), Sampling::Voltage);
        assert_eq!(Topology::ShuntSeries.mixing(), Mixing::Shunt);
        assert_eq!(Topology::ShuntSeries.sampling(), Sampling::Current);
        assert_eq!(Topology::SeriesSeries.sampling(), Sampling::Current);
        assert_eq!(Topology::ShuntShunt.mixing(), Mixing::Shunt);
    }
}
