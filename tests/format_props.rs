//! Properties of the formatter on arbitrary text: it never panics, it is
//! idempotent, it keeps every non-layout token and comment, the parser reads
//! the same statements, values and errors afterwards, and the result has no
//! whitespace at line ends and one line-end style.

#[path = "format/support.rs"]
mod support;

use proptest::prelude::*;
use stoik::format::format;
use stoik::syntax::lexer::{Token, lex};
use support::{comments, meaning, significant_tokens};

/// Pieces of the notation, valid and broken, to glue into random files.
fn fragment() -> impl Strategy<Value = String> {
    let fixed = prop::sample::select(vec![
        "reaction",
        "reaction ",
        "reaction shift",
        "species ",
        "mixture ",
        "units ",
        "use ",
        "energy",
        "K",
        "Kc",
        "dH",
        "kf",
        "source",
        "temperature",
        "CO(g)",
        "H2O(g)",
        "2 NH3",
        "2NH3",
        "1/2",
        "O2",
        "Fe^3+",
        "SO4^2-",
        "Cu²⁺",
        "SO₄²⁻",
        "CuSO4·5H2O",
        "e-",
        "M",
        "hv",
        "A-",
        "<=>",
        "⇌",
        "⇄",
        "->",
        "→",
        "<->",
        "↔",
        "=",
        "<",
        ">",
        "+",
        " + ",
        ":",
        ";",
        ",",
        " ; ",
        " = ",
        "1.0e5",
        "-41.2",
        "298.15",
        "at",
        " at ",
        "kJ/mol",
        "J/(mol*K)",
        "°C",
        "degC",
        "1/s",
        "arrhenius(",
        "A = 1e13 1/s",
        ", n = 0",
        "Ea = 80 kJ/mol",
        ")",
        "\"str\"",
        "\"open",
        "\"esc\\\"aped\"",
        "# comment",
        "#",
        "# stoik: allow x",
        "\n",
        "\n",
        "\n",
        "\r\n",
        "\r",
        "\n\n\n",
        " ",
        "  ",
        "   ",
        "\t",
        "\u{a0}",
        "\u{feff}",
        "\n  ",
        "\n\t",
        "\n    ",
        "1e400",
        "0 A",
        "ethanol",
    ])
    .prop_map(str::to_string);
    prop_oneof![
        8 => fixed,
        1 => "[A-Za-z0-9()^+-]{200,400}",
        1 => "\\PC{0,6}",
    ]
}

/// A file glued from fragments.
fn soup() -> impl Strategy<Value = String> {
    prop::collection::vec(fragment(), 0..80).prop_map(|v| v.concat())
}

/// Whitespace the formatter may put between tokens in a written file.
fn ws() -> impl Strategy<Value = &'static str> {
    prop::sample::select(vec!["", " ", " ", "  ", "\t", " \t "])
}

fn ws1() -> impl Strategy<Value = &'static str> {
    prop::sample::select(vec![" ", " ", "  ", "\t", "   "])
}

/// A statement header of one of the five kinds.
fn header() -> impl Strategy<Value = String> {
    let species = prop::sample::select(vec![
        "CO(g)",
        "H2O(g)",
        "2 NH3(g)",
        "1/2 O2(g)",
        "Fe^3+(aq)",
        "Cu²⁺",
        "e-",
        "0.5 O2",
        "3H2",
    ]);
    let arrow = prop::sample::select(vec!["<=>", "⇌", "->", "→", "=", "<->"]);
    prop_oneof![
        (
            ws(),
            ws(),
            species.clone(),
            ws1(),
            species.clone(),
            ws(),
            arrow,
            ws(),
            species.clone(),
            ws1(),
            species.clone()
        )
            .prop_map(|(a, b, s1, c, s2, d, ar, e, s3, f, s4)| {
                format!("reaction{a}lbl{b}:{c}{s1}{c}+{f}{s2}{d}{ar}{e}{s3}{f}+{c}{s4}")
            }),
        (ws1(), species.clone(), ws(), ws(), ws(), ws()).prop_map(|(a, s, b, c, d, e)| {
            format!("species{a}{s}{b};{c}dHf{d}={e}-45.9 kJ/mol")
        }),
        (ws1(), ws(), ws(), ws(), ws()).prop_map(|(a, b, c, d, e)| {
            format!("units{a}energy{b}={c}kJ/mol{d},{e}temperature = K")
        }),
        ws1().prop_map(|a| format!("mixture{a}feed")),
        ws1().prop_map(|a| format!("use{a}\"other.stoik\"")),
    ]
}

/// An attribute line with random indentation, spacing and comment.
fn attribute() -> impl Strategy<Value = String> {
    let indent = prop::sample::select(vec![" ", "  ", "\t", "    ", "\u{a0}", " \t"]);
    let name = prop::sample::select(vec!["K", "dH", "source", "temperature", "N2(g)", "kf", "S"]);
    let value = prop::sample::select(vec![
        "1.0e5 at 298.15 K",
        "1.0e5  at   25 °C",
        "-41.2 kJ/mol",
        "192.77 J/(mol*K)",
        "\"invented\"",
        "arrhenius(A=1e13 1/s,n = 0.5 ,Ea= 80 kJ/mol)",
        "1 mol/L",
        "davies",
        "2 1/s ; dH = 3 kJ/mol",
        "1 at",
        "",
    ]);
    let comment = prop::sample::select(vec!["", " # note", "#x", "\t# tab  ", "   # wide"]);
    (indent, name, ws(), ws(), value, comment)
        .prop_map(|(i, n, a, b, v, c)| format!("{i}{n}{a}={b}{v}{c}"))
}

/// A file of statements with attribute lines, comments and blank lines.
fn library() -> impl Strategy<Value = String> {
    let line = prop_oneof![
        3 => header(),
        5 => attribute(),
        1 => Just(String::new()),
        1 => Just("# own-line comment".to_string()),
        1 => Just("   # indented comment   ".to_string()),
    ];
    let newline = prop::sample::select(vec!["\n", "\r\n", "\r"]);
    (prop::collection::vec(line, 0..30), newline, any::<bool>()).prop_map(
        |(lines, nl, final_nl)| {
            let mut text = lines.join(nl);
            if final_nl {
                text.push_str(nl);
            }
            text
        },
    )
}

/// Everything the formatter promises about one input.
fn check_invariants(text: &str) -> Result<(), TestCaseError> {
    let once = format(text);
    let twice = format(&once);
    prop_assert_eq!(&twice, &once, "not idempotent");
    prop_assert_eq!(significant_tokens(text), significant_tokens(&once));
    prop_assert_eq!(comments(text), comments(&once));
    prop_assert_eq!(meaning(text), meaning(&once));
    // No whitespace at line ends: no space token and no comment ending in
    // a space before a line end. A line holding only the byte order mark at
    // the start of the file is the one exception; an unclosed string runs to
    // the line end and is kept whole.
    let lexemes = lex(&once);
    for (i, l) in lexemes.iter().enumerate() {
        let at_line_end = lexemes.get(i + 1).is_none_or(|n| n.token == Token::Newline);
        let piece = &once[l.span.range()];
        let bad = match l.token {
            Token::Space => !(l.span.start() == 0 && piece == "\u{feff}"),
            Token::Comment => piece.ends_with([' ', '\t', '\u{a0}', '\u{feff}']),
            _ => false,
        };
        prop_assert!(
            !(at_line_end && bad),
            "whitespace at a line end: {:?}",
            piece
        );
    }
    if !once.is_empty() {
        prop_assert!(once.ends_with(['\n', '\r']), "no final line end");
    }
    // One line-end style: the first one of the input.
    let style = |t: &str| {
        lex(t)
            .into_iter()
            .filter(|l| l.token == Token::Newline)
            .map(|l| t[l.span.range()].to_string())
            .collect::<Vec<_>>()
    };
    let first = style(text)
        .into_iter()
        .next()
        .unwrap_or_else(|| "\n".into());
    prop_assert!(style(&once).iter().all(|s| *s == first), "mixed line ends");
    Ok(())
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(512))]

    #[test]
    fn arbitrary_text_keeps_its_tokens_and_meaning(text in "\\PC{0,200}") {
        check_invariants(&text)?;
    }

    #[test]
    fn arbitrary_bytes_as_text_never_break_it(text in any::<String>()) {
        check_invariants(&text)?;
    }

    #[test]
    fn fragment_soup_keeps_its_tokens_and_meaning(text in soup()) {
        check_invariants(&text)?;
    }

    #[test]
    fn libraries_keep_their_tokens_and_meaning(text in library()) {
        check_invariants(&text)?;
    }
}

#[test]
fn generated_libraries_are_mostly_rewritten() {
    // The properties above would hold for a formatter that never changes
    // anything; make sure the library strategy's texts do get laid out.
    let text =
        "reaction  lbl :  CO(g)  +  H2O(g)  <=>  CO2(g)  +  H2(g)\n\tK=1.0e5  at   25 °C #x\n";
    assert_eq!(
        format(text),
        "reaction lbl: CO(g) + H2O(g) <=> CO2(g) + H2(g)\n  K = 1.0e5 at 25 °C  #x\n"
    );
}

#[test]
fn a_long_line_is_kept_whole() {
    let long = format!("reaction: {} <=> B", "A".repeat(20_000));
    assert_eq!(format(&long), format!("{long}\n"));
}
