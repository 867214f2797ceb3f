//! Hamming codes checked by their defining property, computed in the test on
//! integers: every encoder output is a codeword that the decoder returns
//! unchanged; the decoder corrects every single-bit error of every codeword
//! (exhaustive over data words for (7,4) and (15,11), random data words for
//! the longer codes); SEC-DED decoders flag every double error and no single
//! one. Code lengths (7,4), (15,11), (31,26), (63,57) are the perfect
//! Hamming codes (common practice).

mod generate_support;

use generate_support::{evaluate, exhaustive, port_buses, random};
use ribbonmap::generate::{generate, Family, Params};

fn hamming(data: u32, style: &str) -> ribbonmap::network::Network {
    generate(Family::Hamming, &Params::new(data).with_style(style)).unwrap()
}

/// Data words to try: all of them up to 11 bits, else 256 random ones.
fn data_words(data: u32) -> Vec<u128> {
    let vectors = if data <= 11 {
        exhaustive(&[data])
    } else {
        random(&[data], 256, u64::from(data))
    };
    vectors.into_iter().map(|v| v[0]).collect()
}

/// Independent syndrome check: for each parity position 2^j, the XOR of all
/// codeword bits whose 1-based position has bit j set must be 0.
fn is_codeword(word: u128, length: u32) -> bool {
    let mut syndrome = 0u32;
    for pos in 1..=length {
        if (word >> (pos - 1)) & 1 == 1 {
            syndrome ^= pos;
        }
    }
    syndrome == 0
}

#[test]
fn codes_have_the_perfect_lengths() {
    for (k, n) in [(4u32, 7u32), (11, 15), (26, 31), (57, 63)] {
        let (_, outs) = port_buses(&hamming(k, "encoder"));
        assert_eq!(outs, vec![("c".to_string(), n)]);
        let (_, outs) = port_buses(&hamming(k, "secded-encoder"));
        assert_eq!(outs, vec![("c".to_string(), n + 1)]);
        let (ins, outs) = port_buses(&hamming(k, "secded-decoder"));
        assert_eq!(ins, vec![("c".to_string(), n + 1)]);
        assert_eq!(
            outs,
            vec![("d".to_string(), k), ("double_error".to_string(), 1)]
        );
    }
}

#[test]
fn single_errors_are_corrected() {
    for (k, n) in [
        (4u32, 7u32),
        (11, 15),
        (26, 31),
        (57, 63),
        (8, 12),
        (16, 21),
    ] {
        let encoder = hamming(k, "encoder");
        let decoder = hamming(k, "decoder");
        let data = data_words(k);
        let codes: Vec<u128> =
            evaluate(&encoder, &data.iter().map(|&d| vec![d]).collect::<Vec<_>>())
                .into_iter()
                .map(|o| o[0])
                .collect();
        // Every code word passes the independent syndrome check, and distinct
        // data give distinct code words.
        assert!(codes.iter().all(|&c| is_codeword(c, n)), "({n},{k})");
        // Distinct data words (random ones may repeat) give distinct code
        // words.
        let mut pairs: Vec<(u128, u128)> =
            data.iter().copied().zip(codes.iter().copied()).collect();
        pairs.sort_unstable();
        pairs.dedup();
        let mut distinct_codes: Vec<u128> = pairs.iter().map(|p| p.1).collect();
        distinct_codes.sort_unstable();
        distinct_codes.dedup();
        assert_eq!(
            distinct_codes.len(),
            pairs.len(),
            "({n},{k}): equal code words"
        );
        // Exhaustive codes: the minimum distance of a Hamming code is 3
        // (common practice), checked over every pair of code words.
        if k <= 11 {
            let least = codes
                .iter()
                .enumerate()
                .flat_map(|(i, &x)| codes[i + 1..].iter().map(move |&y| (x ^ y).count_ones()))
                .min()
                .unwrap();
            assert_eq!(least, 3, "({n},{k}) minimum distance");
        }
        // Received words: unchanged and every single-bit flip.
        let mut received = Vec::new();
        let mut expected = Vec::new();
        for (&c, &d) in codes.iter().zip(&data) {
            received.push(vec![c]);
            expected.push(d);
            for bit in 0..n {
                received.push(vec![c ^ (1 << bit)]);
                expected.push(d);
            }
        }
        let decoded = evaluate(&decoder, &received);
        for ((r, out), want) in received.iter().zip(&decoded).zip(&expected) {
            assert_eq!(out[0], *want, "({n},{k}) received {:#x}", r[0]);
        }
    }
}

#[test]
fn secded_corrects_single_and_flags_double_errors() {
    for (k, n) in [(4u32, 8u32), (11, 16), (26, 32), (57, 64)] {
        let encoder = hamming(k, "secded-encoder");
        let decoder = hamming(k, "secded-decoder");
        let mut data = data_words(k);
        data.truncate(if k <= 4 { 16 } else { 24 });
        let codes: Vec<u128> =
            evaluate(&encoder, &data.iter().map(|&d| vec![d]).collect::<Vec<_>>())
                .into_iter()
                .map(|o| o[0])
                .collect();
        for &c in &codes {
            assert_eq!(c.count_ones() % 2, 0, "overall parity is even");
            assert!(is_codeword(c & ((1 << (n - 1)) - 1), n - 1));
        }
        let mut received = Vec::new();
        let mut expected = Vec::new(); // (data, double_error)
        for (&c, &d) in codes.iter().zip(&data) {
            received.push(vec![c]);
            expected.push((d, 0));
            for i in 0..n {
                received.push(vec![c ^ (1 << i)]);
                expected.push((d, 0));
                for j in i + 1..n {
                    received.push(vec![c ^ (1 << i) ^ (1 << j)]);
                    expected.push((u128::MAX, 1));
                }
            }
        }
        let decoded = evaluate(&decoder, &received);
        for ((r, out), &(d, double)) in received.iter().zip(&decoded).zip(&expected) {
            assert_eq!(out[1], double, "({n},{k}) received {:#x}", r[0]);
            if double == 0 {
                assert_eq!(out[0], d, "({n},{k}) received {:#x}", r[0]);
            }
        }
    }
}
