//! The cell-function expression language: random expressions evaluate like
//! a direct evaluator written here, and errors carry the column.

use proptest::prelude::*;
use ribbonmap::truth::{expression_truth, parse_expression};

#[derive(Clone, Debug)]
enum E {
    Const(bool),
    Var(usize),
    Not(Box<E>, bool),
    And(Box<E>, Box<E>),
    Xor(Box<E>, Box<E>),
    Or(Box<E>, Box<E>),
    Maj(Box<E>, Box<E>, Box<E>),
}

const NAMES: [&str; 4] = ["a", "b", "carry_in", "x1"];

fn eval(e: &E, row: u64) -> bool {
    match e {
        E::Const(v) => *v,
        E::Var(k) => (row >> k) & 1 == 1,
        E::Not(a, _) => !eval(a, row),
        E::And(a, b) => eval(a, row) & eval(b, row),
        E::Xor(a, b) => eval(a, row) ^ eval(b, row),
        E::Or(a, b) => eval(a, row) | eval(b, row),
        E::Maj(a, b, c) => (eval(a, row) as u8 + eval(b, row) as u8 + eval(c, row) as u8) >= 2,
    }
}

/// Binding strength of the top operator: NOT 4 > AND 3 > XOR 2 > OR 1
/// (the precedence docs/library-format.md documents for cell functions); atoms 5.
fn level(e: &E) -> u8 {
    match e {
        E::Or(..) => 1,
        E::Xor(..) => 2,
        E::And(..) => 3,
        E::Not(..) => 4,
        _ => 5,
    }
}

/// Writes `e` with only the parentheses precedence needs (plus some extra
/// when `extra` says so), so the parser's precedence is exercised.
fn render(e: &E, extra: bool) -> String {
    let wrap = |child: &E, min: u8| {
        let s = render(child, extra);
        if level(child) < min || (extra && level(child) < 5) {
            format!("({s})")
        } else {
            s
        }
    };
    match e {
        E::Const(v) => (if *v { "1" } else { "0" }).to_string(),
        E::Var(k) => NAMES[*k].to_string(),
        E::Not(a, tilde) => format!("{}{}", if *tilde { "~" } else { "!" }, wrap(a, 4)),
        // Left operand may share the level (left associative); right must bind tighter.
        E::And(a, b) => format!("{} & {}", wrap(a, 3), wrap(b, 4)),
        E::Xor(a, b) => format!("{} ^ {}", wrap(a, 2), wrap(b, 3)),
        E::Or(a, b) => format!("{}|{}", wrap(a, 1), wrap(b, 2)),
        E::Maj(a, b, c) => format!(
            "maj({}, {},{})",
            render(a, extra),
            render(b, extra),
            render(c, extra)
        ),
    }
}

fn expr() -> impl Strategy<Value = E> {
    let leaf = prop_oneof![
        any::<bool>().prop_map(E::Const),
        (0usize..4).prop_map(E::Var)
    ];
    leaf.prop_recursive(5, 40, 3, |inner| {
        prop_oneof![
            (inner.clone(), any::<bool>()).prop_map(|(a, t)| E::Not(Box::new(a), t)),
            (inner.clone(), inner.clone()).prop_map(|(a, b)| E::And(Box::new(a), Box::new(b))),
            (inner.clone(), inner.clone()).prop_map(|(a, b)| E::Xor(Box::new(a), Box::new(b))),
            (inner.clone(), inner.clone()).prop_map(|(a, b)| E::Or(Box::new(a), Box::new(b))),
            (inner.clone(), inner.clone(), inner).prop_map(|(a, b, c)| E::Maj(
                Box::new(a),
                Box::new(b),
                Box::new(c)
            )),
        ]
    })
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(400))]

    #[test]
    fn random_expressions_evaluate_like_a_direct_evaluator(e in expr(), extra in any::<bool>()) {
        let text = render(&e, extra);
        let truth = expression_truth(&text, &NAMES).map_err(|err| TestCaseError::fail(format!("{text}: {err}")))?;
        for row in 0..16u64 {
            prop_assert_eq!((truth >> row) & 1 == 1, eval(&e, row), "{} row {}", text, row);
        }
        prop_assert_eq!(truth >> 16, 0);
    }

    #[test]
    fn any_text_gives_a_result_or_an_error_with_a_column(text in "[ab!~&|^()01,maj ]{0,20}") {
        match parse_expression(&text, &["a", "b"]) {
            Ok(_) => {}
            Err(e) => prop_assert!(e.column >= 1 && e.column <= text.chars().count() + 1),
        }
    }
}

#[test]
fn precedence_is_not_and_xor_or() {
    // a | b ^ c & !d  ==  a | (b ^ (c & (!d)))
    let names = ["a", "b", "c", "d"];
    let t = expression_truth("a | b ^ c & !d", &names).unwrap();
    let u = expression_truth("a | (b ^ (c & (!d)))", &names).unwrap();
    assert_eq!(t, u);
    assert_ne!(t, expression_truth("(a | b) ^ c & !d", &names).unwrap());
    assert_ne!(t, expression_truth("a | (b ^ c) & !d", &names).unwrap());
}

#[test]
fn errors_carry_the_column() {
    let names = ["a", "b", "c"];
    for (text, column, words) in [
        ("a & ", 5, "ends too early"),
        ("a & zz", 5, "unknown name 'zz'"),
        ("a # b", 3, "unexpected character"),
        ("(a | b", 7, "expected ')'"),
        ("a b", 3, "after a complete expression"),
        ("maj(a, b)", 9, "expected ','"),
        ("f(a)", 1, "unknown function"),
        ("2", 1, "only numbers"),
        ("", 1, "empty"),
        ("a & (b | )", 10, "found ')'"),
    ] {
        let e = parse_expression(text, &names).unwrap_err();
        assert_eq!(e.column, column, "{text}: {e}");
        assert!(e.message.contains(words), "{text}: {e}");
    }
}

#[test]
fn an_operator_chain_longer_than_the_documented_limit_is_refused_at_its_operator() {
    // docs/library-format.md: a chain of binary operators may be at most 2000
    // long. A chain of n operands written "a OP a OP ..." is n levels high;
    // 2000 operands parse, 2001 do not, and the error points at the operator
    // that makes the chain too long: the 2000th, at column 4 * 2000 - 1 =
    // 7999 (each "a OP " is four characters; hand arithmetic).
    for op in ["&", "^", "|"] {
        let ok = vec!["a"; 2000].join(&format!(" {op} "));
        let value = parse_expression(&ok, &["a"]).unwrap().truth(1);
        // a & a & ... = a, a | a | ... = a, and 2000 a's XORed cancel to 0
        // (common practice).
        assert_eq!(value, if op == "^" { 0b00 } else { 0b10 }, "{op}");
        let long = vec!["a"; 2001].join(&format!(" {op} "));
        let e = parse_expression(&long, &["a"]).unwrap_err();
        assert_eq!(e.column, 7999, "{op}: {e}");
        assert!(e.message.contains("operators deep"), "{op}: {e}");
        assert_eq!(long.chars().nth(7998), op.chars().next());
    }
}
