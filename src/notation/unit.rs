//! The units a typed value may carry (`10 kΩ`, `2.2 µF`, `3 dB`).

/// A unit word the reader knows. Symbols as the SI Brochure (BIPM, 9th ed., 2019,
/// table 4 and 8) writes them, case-sensitive: `S` is siemens, `s` second.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub enum Unit {
    /// Ω, also written `ohm`, `ohms` or with the ohm sign U+2126.
    Ohm,
    /// V.
    Volt,
    /// A.
    Ampere,
    /// S.
    Siemens,
    /// Hz.
    Hertz,
    /// F.
    Farad,
    /// H.
    Henry,
    /// dB (takes no SI prefix; only where a context allows a level).
    Decibel,
    /// W.
    Watt,
    /// s.
    Second,
    /// % — a display unit only: a result that is already a percentage (the
    /// worst-case deviation −0.0998 % is the number −0.0998), shown as `−0.0998 %`
    /// without an SI prefix. No literal is read into it (the reader's `%` scales
    /// the number by 0.01 instead), so it is not in [`Unit::ALL`] and
    /// [`Unit::from_word`] does not return it; [`Unit::from_result_word`] does.
    Percent,
}

/// Every spelling the reader accepts, longest first where one spelling begins
/// another (`ohms` before `ohm`, `Hz` before `H`).
pub(crate) const SPELLINGS: [(&str, Unit); 13] = [
    ("ohms", Unit::Ohm),
    ("ohm", Unit::Ohm),
    ("\u{3a9}", Unit::Ohm),
    ("\u{2126}", Unit::Ohm),
    ("Hz", Unit::Hertz),
    ("dB", Unit::Decibel),
    ("V", Unit::Volt),
    ("A", Unit::Ampere),
    ("W", Unit::Watt),
    ("S", Unit::Siemens),
    ("F", Unit::Farad),
    ("H", Unit::Henry),
    ("s", Unit::Second),
];

impl Unit {
    /// Every unit a literal may carry (all but the display unit [`Unit::Percent`]).
    pub const ALL: [Unit; 10] = [
        Unit::Ohm,
        Unit::Volt,
        Unit::Ampere,
        Unit::Siemens,
        Unit::Hertz,
        Unit::Farad,
        Unit::Henry,
        Unit::Decibel,
        Unit::Watt,
        Unit::Second,
    ];

    /// The symbol as shown (`Ω` is U+03A9).
    pub const fn symbol(self) -> &'static str {
        match self {
            Unit::Ohm => "Ω",
            Unit::Volt => "V",
            Unit::Ampere => "A",
            Unit::Siemens => "S",
            Unit::Hertz => "Hz",
            Unit::Farad => "F",
            Unit::Henry => "H",
            Unit::Decibel => "dB",
            Unit::Watt => "W",
            Unit::Second => "s",
            Unit::Percent => "%",
        }
    }

    /// The unit spelled exactly `s`: a symbol, `ohm`, `ohms`, or the ohm sign U+2126.
    ///
    /// ```
    /// use loopwright::notation::Unit;
    /// assert_eq!(Unit::from_word("ohms"), Some(Unit::Ohm));
    /// assert_eq!(Unit::from_word("hz"), None); // symbols are case-sensitive
    /// ```
    pub fn from_word(s: &str) -> Option<Unit> {
        SPELLINGS.iter().find(|(w, _)| *w == s).map(|&(_, u)| u)
    }

    /// The unit a function's catalog entry states for a result: a unit word as
    /// [`Unit::from_word`] reads it, or `%` for a result that is already a
    /// percentage ([`Unit::Percent`], shown without scaling).
    ///
    /// ```
    /// use loopwright::notation::Unit;
    /// assert_eq!(Unit::from_result_word("%"), Some(Unit::Percent));
    /// assert_eq!(Unit::from_word("%"), None);
    /// assert_eq!(Unit::from_result_word("Hz"), Some(Unit::Hertz));
    /// ```
    pub fn from_result_word(s: &str) -> Option<Unit> {
        if s == "%" {
            Some(Unit::Percent)
        } else {
            Unit::from_word(s)
        }
    }

    /// What a value declared in this unit must be written in, for the reader's error.
    pub(crate) const fn requirement(self) -> &'static str {
        match self {
            Unit::Ohm => "this value is in Ω: write it in Ω or as a plain number",
            Unit::Volt => "this value is in V: write it in V or as a plain number",
            Unit::Ampere => "this value is in A: write it in A or as a plain number",
            Unit::Siemens => "this value is in S: write it in S or as a plain number",
            Unit::Hertz => "this value is in Hz: write it in Hz or as a plain number",
            Unit::Farad => "this value is in F: write it in F or as a plain number",
            Unit::Henry => "this value is in H: write it in H or as a plain number",
            Unit::Decibel => "this value is in dB: write it in dB or as a plain number",
            Unit::Watt => "this value is in W: write it in W or as a plain number",
            Unit::Second => "this value is in s: write it in s or as a plain number",
            Unit::Percent => "this value is a percentage: write it as a plain number",
        }
    }
}
