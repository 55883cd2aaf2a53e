//! The words an engineer may search the function help with, kept beside the
//! catalog entries they belong to: synonyms, trade words, abbreviations and units
//! that the name, summary and parameters do not already say. The catalog JSON
//! carries them as each function's `words`; the page's help searches them with
//! the rest of the entry.

/// Function name → space-separated search words. Names not listed have none.
const WORDS: &[(&str, &str)] = &[
    (
        "CIRCUIT.GAIN",
        "netlist nodal mna two-port blackman closed-loop gain schematic",
    ),
    (
        "CIRCUIT.RIN",
        "input impedance input resistance ohm Ω netlist blackman",
    ),
    (
        "CIRCUIT.ROUT",
        "output impedance output resistance ohm Ω netlist blackman",
    ),
    ("CIRCUIT.IDEAL", "ideal gain 1/beta error netlist"),
    ("DB.VOLTAGE", "decibel dB 20log voltage ratio level"),
    ("DB.POWER", "decibel dB 10log power ratio level"),
    ("DB.VOLTAGERATIO", "decibel dB to ratio antilog voltage"),
    ("DB.POWERRATIO", "decibel dB to ratio antilog power"),
    (
        "DISTORTION.SERIES",
        "nonlinearity power series polynomial coefficients a1 a2 a3 b1 b2 b3 harmonic",
    ),
    (
        "DISTORTION.HD",
        "thd harmonic distortion hd2 hd3 second third harmonic percent % ppm nonlinearity",
    ),
    (
        "DISTORTION.FPBW",
        "full-power bandwidth slew rate large-signal V/µs sine peak",
    ),
    (
        "DISTORTION.MAXAMP",
        "slew rate largest amplitude swing V/µs sine peak",
    ),
    (
        "DISTORTION.SLEWRATE",
        "slew rate V/µs sine peak large-signal",
    ),
    (
        "FEEDBACK.GAIN",
        "closed-loop gain Af A/(1+Aβ) non-inverting beta feedback factor",
    ),
    ("FEEDBACK.LOOPGAIN", "loop gain T Aβ return ratio"),
    ("FEEDBACK.AMOUNT", "amount of feedback desensitivity D 1+Aβ"),
    (
        "FEEDBACK.AMOUNTDB",
        "amount of feedback desensitivity D decibel dB",
    ),
    (
        "FEEDBACK.SENSITIVITY",
        "sensitivity gain error desensitivity",
    ),
    ("FEEDBACK.SENSE", "sign positive negative feedback check"),
    (
        "FEEDBACK.BETA",
        "feedback factor beta β divider ratio design inverse",
    ),
    (
        "FEEDBACK.MINGAIN",
        "open-loop gain requirement gain error accuracy percent % ppm",
    ),
    ("FEEDBACK.CEILING", "gain error limit accuracy ceiling"),
    (
        "FEEDBACK.SPREAD",
        "tolerance min typ max gain spread datasheet percent % ppm",
    ),
    (
        "FEEDBACK.ZIN",
        "input impedance input resistance ohm Ω series shunt mixing topology",
    ),
    (
        "FEEDBACK.ZOUT",
        "output impedance output resistance ohm Ω series shunt sampling topology",
    ),
    (
        "FEEDBACK.IMPEDANCES",
        "input output impedance complex ohm Ω topology",
    ),
    (
        "FEEDBACK.PHASOR",
        "complex gain phase degrees ° phasor frequency",
    ),
    (
        "FEEDBACK.SUMMARY",
        "overview gain loop gain amount impedances topology",
    ),
    (
        "FEEDBACK.GAINUNIT",
        "transresistance transconductance current voltage gain units topology",
    ),
    ("FEEDBACK.BETAUNIT", "feedback factor units topology"),
    (
        "FREQ.PM",
        "phase margin stability crossover degrees ° bode loop",
    ),
    (
        "FREQ.GM",
        "gain margin stability phase crossover dB bode loop",
    ),
    (
        "FREQ.BANDWIDTH",
        "closed-loop bandwidth -3 dB f3dB Hz corner",
    ),
    ("FREQ.PEAKING", "peaking dB resonance closed-loop response"),
    (
        "FREQ.STEP",
        "step response overshoot percent % rise time settling transient",
    ),
    ("FREQ.POLES", "closed-loop poles roots s-plane damping"),
    (
        "FREQ.EXTEND",
        "bandwidth extension gain-bandwidth pole shift",
    ),
    (
        "FREQ.LOWCUT",
        "low-frequency cutoff coupling capacitor high-pass Hz",
    ),
    (
        "FREQ.GBW",
        "gain-bandwidth product gbw unity-gain frequency ft Hz op-amp",
    ),
    (
        "FREQ.TWOPOLE",
        "two-pole Q damping ζ natural frequency peaking overshoot",
    ),
    (
        "FREQ.DOMINANT",
        "dominant pole compensation phase margin Hz",
    ),
    (
        "FREQ.MAXBETA",
        "compensation largest beta phase margin stability",
    ),
    (
        "NETWORK.NEAREST",
        "E-series E96 E24 E12 E6 E48 E192 preferred value resistor IEC 60063 standard value",
    ),
    (
        "NETWORK.UP",
        "E-series E96 E24 E12 preferred value resistor round up next standard value",
    ),
    (
        "NETWORK.DOWN",
        "E-series E96 E24 E12 preferred value resistor round down standard value",
    ),
    (
        "NETWORK.TOLERANCE",
        "E-series E96 E24 E12 tolerance percent % grade resistor",
    ),
    (
        "NETWORK.PAIR",
        "resistor pair ratio divider R1 R2 E-series E96 E24 E12 gain resistors ohm Ω",
    ),
    (
        "NETWORK.WORSTCASE",
        "worst case tolerance resistor divider gain extremes percent %",
    ),
    (
        "NETWORK.MONTECARLO",
        "monte carlo statistics tolerance yield resistor random",
    ),
    (
        "NETWORK.YIELD",
        "yield tolerance spec percent % pass rate resistor",
    ),
    (
        "NETWORK.CHOOSE",
        "choose parts series grade tolerance yield cost cheapest resistor pair spec",
    ),
    (
        "NOISE.THERMAL",
        "johnson nyquist thermal noise resistor nV/√Hz kT",
    ),
    (
        "TOLERANCE.WORSTCASE",
        "worst case corners extreme min max tolerance tempco ppm/K temperature drift gbw ro a0 spread E96 resistor",
    ),
    (
        "TOLERANCE.YIELD",
        "monte carlo yield spec limits tolerance normal gaussian sigma uniform tempco temperature production",
    ),
    (
        "TOLERANCE.SPECYIELD",
        "spec specification limits several figures together overall yield per limit pass fail production test gain bandwidth phase margin datasheet table monte carlo",
    ),
    (
        "TOLERANCE.SPECWORST",
        "spec specification limits several figures together worst case corners extreme min max pass fail guaranteed datasheet table",
    ),
    (
        "TOLERANCE.MONTECARLO",
        "monte carlo distribution percentile histogram mean standard deviation sigma spread tolerance tempco",
    ),
    (
        "TOLERANCE.SENSITIVITY",
        "sensitivity derivative variance share contribution budget tighten critical part tolerance",
    ),
    (
        "TOLERANCE.TIGHTEN",
        "which part tighten first critical part variance share sensitivity tolerance budget",
    ),
    (
        "NOISE.STAGE",
        "noise density en in nV/√Hz pA/√Hz input-referred op-amp resistor",
    ),
    (
        "NOISE.TOTAL",
        "integrated noise rms band 1/f corner µV nV op-amp",
    ),
];

/// The search words of the function `name` (empty when it has none).
pub fn search_words(name: &str) -> &'static str {
    WORDS
        .iter()
        .find(|(n, _)| *n == name)
        .map_or("", |(_, w)| w)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::sheet::functions::all;

    #[test]
    fn every_listed_name_is_a_catalog_function() {
        for (name, words) in WORDS {
            assert!(
                all().any(|f| f.name == *name),
                "{name} is not in the catalog"
            );
            assert!(!words.trim().is_empty(), "{name} lists no words");
        }
    }

    #[test]
    fn trade_words_find_their_functions() {
        // The searches the engineers' trial (issue 20) found wanting.
        assert!(search_words("NETWORK.PAIR").contains("E96"));
        assert!(search_words("NETWORK.PAIR").contains("resistor pair"));
        assert!(search_words("NETWORK.NEAREST").contains("E-series"));
        assert!(search_words("DISTORTION.HD").contains("thd"));
        assert!(search_words("TOLERANCE.TIGHTEN").contains("tighten"));
        assert!(search_words("TOLERANCE.WORSTCASE").contains("ppm/K"));
        assert!(search_words("TOLERANCE.SPECYIELD").contains("specification"));
        assert!(search_words("TOLERANCE.SPECYIELD").contains("overall yield"));
        assert_eq!(search_words("NO.SUCH"), "");
    }
}
