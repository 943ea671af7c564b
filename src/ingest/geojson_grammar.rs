//! What the streaming reader accepts of JSON's grammar (RFC 8259): every leniency a hand-written
//! scanner could have, each refused or, where the grammar allows it, accepted for a stated reason.

use super::*;

/// A collection around `features` (the array's inside) with `extra` members before it.
fn text(extra: &str, features: &str) -> String {
    format!(r#"{{"type":"FeatureCollection",{extra}"features":[{features}]}}"#)
}

/// One line feature with `props` (an object's inside) and the given coordinates text.
fn feature(props: &str, coords: &str) -> String {
    format!(
        r#"{{"type":"Feature","properties":{{{props}}},"geometry":{{"type":"LineString","coordinates":{coords}}}}}"#
    )
}

const LINE: &str = "[[0,0],[1,1]]";

/// Reads `s` keeping the property `kept`; the error's message, or `None` when accepted.
fn refusal(s: &str) -> Option<String> {
    let wanted = vec!["kept".to_string()];
    match read_collection(s.as_bytes(), &wanted, |_, _| Ok::<(), String>(())) {
        Ok(_) => None,
        Err(ReadFailure::Syntax { message, .. }) => Some(message),
        Err(other) => Some(format!("{other:?}")),
    }
}

#[test]
fn trailing_commas_are_refused_with_their_position() {
    let ok = feature("", LINE);
    let features = refusal(&text("", &format!("{ok},"))).unwrap();
    assert!(
        features.contains("trailing comma") && features.contains("line 1 column"),
        "{features}"
    );
    let top = refusal(&format!(
        r#"{{"type":"FeatureCollection","features":[{ok}],}}"#
    ))
    .unwrap();
    assert!(top.contains("trailing comma"), "{top}");
    // Inside a feature serde_json refuses them: in the feature, its properties (kept or
    // skipped), its geometry and its coordinate arrays.
    for s in [
        ok.replacen("\"Feature\",", "\"Feature\",,", 1),
        feature(r#""kept":1,"#, LINE),
        feature(r#""other":[1,2,],"a":1"#, LINE),
        feature("", "[[0,0],[1,1],]"),
        feature("", "[[0,0,],[1,1]]"),
        ok.replace(r#""LineString","#, r#""LineString",,"#),
    ] {
        assert!(refusal(&text("", &s)).is_some(), "accepted: {s}");
    }
    // An empty element between two features.
    assert!(refusal(&text("", &format!("{ok},,{ok}"))).is_some());
    assert!(refusal(&text("", &format!(",{ok}"))).is_some());
}

#[test]
fn numbers_outside_the_grammar_are_refused() {
    // RFC 8259 §6: no leading zeros, no NaN or Infinity, no plus sign, no hexadecimal, no bare
    // point; in coordinates, in kept and in skipped properties, and in skipped collection members.
    for bad in [
        "01",
        "NaN",
        "Infinity",
        "-Infinity",
        "+1",
        "0x10",
        ".5",
        "1.",
        "-",
    ] {
        for s in [
            text("", &feature("", &format!("[[0,0],[1,{bad}]]"))),
            text("", &feature(&format!(r#""kept":{bad}"#), LINE)),
            text("", &feature(&format!(r#""other":{bad}"#), LINE)),
            text(&format!(r#""extra":{bad},"#), &feature("", LINE)),
        ] {
            assert!(refusal(&s).is_some(), "accepted: {s}");
        }
    }
}

#[test]
fn comments_quotes_and_control_characters_are_refused() {
    let ok = feature("", LINE);
    for s in [
        format!("// roads\n{}", text("", &ok)),
        text("/* a */", &ok),
        text("", &format!("{ok} // last")),
        text("", &feature(r#""other":1 /* x */"#, LINE)),
        text("", &feature("'kept':1", LINE)),
        text("", &feature("kept:1", LINE)),
        text("", &feature(r#""other":'x'"#, LINE)),
        // An unescaped control character (U+0009, a tab) inside a string: RFC 8259 §7.
        text("", &feature("\"kept\":\"a\tb\"", LINE)),
        text("", &feature("\"other\":\"a\u{1}b\"", LINE)),
        text("\"extra\":\"a\nb\",", &ok),
    ] {
        assert!(refusal(&s).is_some(), "accepted: {s:?}");
    }
}

#[test]
fn a_second_top_level_value_is_refused() {
    let one = text("", &feature("", LINE));
    for s in [
        format!("{one}{one}"),
        format!("{one} 1"),
        format!("{one} x"),
        format!("{one}]"),
    ] {
        let m = refusal(&s).unwrap_or_else(|| panic!("accepted: {s}"));
        assert!(m.contains("the end of the file"), "{m}");
    }
    // White space after the value is JSON (RFC 8259 §2).
    assert_eq!(refusal(&format!("{one} \r\n\t ")), None);
}

#[test]
fn lone_surrogates_are_refused_where_read_and_allowed_where_skipped() {
    // RFC 8259 §8.2: the grammar allows an escaped lone surrogate, but it is no character. A
    // value reknit reads (a kept property) is refused; one it skips unread is accepted, as the
    // grammar allows it and nothing of it reaches an output.
    let kept = text("", &feature(r#""kept":"a\ud800b""#, LINE));
    assert!(refusal(&kept).is_some());
    let skipped = text("", &feature(r#""other":"a\ud800b""#, LINE));
    assert_eq!(refusal(&skipped), None);
    // A proper pair is a character.
    assert_eq!(
        refusal(&text("", &feature(r#""kept":"\ud83d\ude00""#, LINE))),
        None
    );
}
