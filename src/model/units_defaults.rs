//! Default units: the kinds a `units` statement or `stoik.toml` can set, and
//! the unit assumed when neither does.

/// The kinds of quantity a default unit can be given for.
pub const KINDS: &[&str] = &[
    "energy",
    "entropy",
    "temperature",
    "concentration",
    "pressure",
    "time",
    "amount",
    "volume",
];

/// The unit a bare number of each kind is read in when no default is set,
/// with a `missing-unit` warning (common practice in tabulated data).
pub fn assumed(kind: &str) -> &'static str {
    match kind {
        "energy" => "kJ/mol",
        "entropy" => "J/(mol*K)",
        "temperature" => "K",
        "concentration" => "mol/L",
        "pressure" => "bar",
        "time" => "s",
        "amount" => "mol",
        "volume" => "L",
        _ => "",
    }
}
