//! Round trips and hostile inputs for the readers and writers together.

use super::*;
use proptest::prelude::*;

fn pseudo(rows: usize, cols: usize, seed: u64) -> Matrix {
    let mut s = seed | 1;
    Matrix::from_fn(rows, cols, |_, _| {
        s ^= s << 13;
        s ^= s >> 7;
        s ^= s << 17;
        s & 1 == 1
    })
}

fn roundtrip_formats() -> Vec<(WriteFormat, Format)> {
    vec![
        (WriteFormat::Pm, Format::Pm),
        (WriteFormat::Csv, Format::Int),
        (
            WriteFormat::Bits {
                one_is_negative: true,
            },
            Format::Bits,
        ),
        (
            WriteFormat::Bits {
                one_is_negative: false,
            },
            Format::Bits,
        ),
        (WriteFormat::Json, Format::Json),
        (WriteFormat::Npy, Format::Npy),
        (WriteFormat::NpyF64 { scaled: false }, Format::Npy),
    ]
}

#[test]
fn write_then_read_gives_the_same_matrix() {
    for &(r, c) in &[
        (1, 1),
        (2, 2),
        (3, 70),
        (64, 64),
        (65, 130),
        (12, 5),
        (1, 200),
    ] {
        let m = pseudo(r, c, (r * 131 + c) as u64);
        for (wf, f) in roundtrip_formats() {
            let mut out = Vec::new();
            write(&m, &wf, &mut out);
            let p = read(&out, &ReadOptions::default())
                .unwrap_or_else(|e| panic!("{wf:?} {r}x{c}: {e}"));
            assert_eq!(p.format, f, "{wf:?} {r}x{c}");
            assert_eq!(p.matrix, m, "{wf:?} {r}x{c}");
            assert!(p.erasures.is_empty());
            // Forcing the format, and the opposite bits default, change nothing.
            let forced = ReadOptions {
                format: Some(f),
                bits_one_is_negative: false,
                ..ReadOptions::default()
            };
            assert_eq!(
                read(&out, &forced).map(|p| p.matrix),
                Ok(m.clone()),
                "{wf:?} forced"
            );
        }
    }
}

#[test]
fn pm_output_is_the_canonical_text() {
    let m = pseudo(9, 77, 5);
    let mut out = Vec::new();
    write(&m, &WriteFormat::Pm, &mut out);
    assert_eq!(out, m.canonical_text().as_bytes());
    assert_eq!(crate::id::sha256_hex(&out), crate::id::matrix_id(&m));
}

/// A sink that takes a few bytes at a time, to check that streaming writes add up.
struct Trickle(Vec<u8>);

impl std::io::Write for Trickle {
    fn write(&mut self, buf: &[u8]) -> std::io::Result<usize> {
        let n = buf.len().min(7);
        self.0.extend_from_slice(&buf[..n]);
        Ok(n)
    }
    fn flush(&mut self) -> std::io::Result<()> {
        Ok(())
    }
}

#[test]
fn write_to_streams_the_same_bytes() {
    let m = pseudo(300, 300, 9);
    let mut all = roundtrip_formats()
        .into_iter()
        .map(|(w, _)| w)
        .collect::<Vec<_>>();
    all.push(WriteFormat::NpyF64 { scaled: true });
    all.push(WriteFormat::Png {
        scale: 2,
        marked_rows: vec![3],
    });
    for wf in all {
        let mut whole = Vec::new();
        write(&m, &wf, &mut whole);
        let mut t = Trickle(Vec::new());
        write_to(&m, &wf, &mut t).unwrap();
        assert_eq!(t.0, whole, "{wf:?}");
    }
}

#[test]
fn scaled_f64_rows_are_unit_vectors() {
    let m = pseudo(4, 16, 3);
    let mut out = Vec::new();
    write(&m, &WriteFormat::NpyF64 { scaled: true }, &mut out);
    let data = &out[out.len() - 4 * 16 * 8..];
    let x: Vec<f64> = data
        .chunks_exact(8)
        .map(|c| f64::from_le_bytes(c.try_into().unwrap()))
        .collect();
    assert!(x.iter().all(|v| (v.abs() - 0.25).abs() < 1e-15));
    assert_eq!(x[0] < 0.0, m.is_negative(0, 0));
    // The registry's own scaled download reads back as the matrix it came from.
    assert_eq!(read(&out, &ReadOptions::default()).unwrap().matrix, m);
    // Another scale is refused at its first element; so is one element off the scale.
    let mut half = out.clone();
    let n = half.len();
    for c in half[n - 4 * 16 * 8..].chunks_exact_mut(8) {
        let v = f64::from_le_bytes((&*c).try_into().unwrap()) * 2.0;
        c.copy_from_slice(&v.to_le_bytes());
    }
    let e = read(&half, &ReadOptions::default()).unwrap_err();
    assert_eq!(e.location, Location::Element(0));
    assert!(e.message.contains("1/√16"), "{}", e.message);
    let mut mixed = out.clone();
    let at = n - 4 * 16 * 8 + 5 * 8;
    mixed[at..at + 8].copy_from_slice(&1.0f64.to_le_bytes());
    let e = read(&mixed, &ReadOptions::default()).unwrap_err();
    assert_eq!(e.location, Location::Element(5));
    assert!(e.message.contains("scaled by 1/√16"), "{}", e.message);
}

#[test]
fn png_pixels_are_the_entries() {
    let m = pseudo(5, 7, 2);
    let mut out = Vec::new();
    write(
        &m,
        &WriteFormat::Png {
            scale: 3,
            marked_rows: vec![1, 99],
        },
        &mut out,
    );
    let dec = png::Decoder::new(std::io::Cursor::new(&out));
    let mut reader = dec.read_info().unwrap();
    let mut buf = vec![0; reader.output_buffer_size()];
    let info = reader.next_frame(&mut buf).unwrap();
    assert_eq!((info.width, info.height), (21, 15));
    assert_eq!(reader.info().palette.as_ref().map(|p| p.len()), Some(96));
    for y in 0..15 {
        for x in 0..21 {
            let (i, j) = (y / 3, x / 3);
            let want = if m.is_negative(i, j) { 15 } else { 0 } + if i == 1 { 16 } else { 0 };
            assert_eq!(buf[y * info.line_size + x], want, "pixel ({x}, {y})");
        }
    }
    for m in [
        Matrix::ones(0, 0),
        Matrix::ones(3, 0),
        Matrix::ones(0, 3),
        pseudo(1, 1, 1),
    ] {
        let mut out = Vec::new();
        write(
            &m,
            &WriteFormat::Png {
                scale: 0,
                marked_rows: vec![],
            },
            &mut out,
        );
        let mut r = png::Decoder::new(std::io::Cursor::new(&out))
            .read_info()
            .unwrap();
        let mut buf = vec![0; r.output_buffer_size()];
        assert!(r.next_frame(&mut buf).is_ok(), "{m:?}");
    }
}

#[test]
fn erasures_are_listed_and_can_be_refused() {
    for text in ["+?-\n?++\n", "1 ? -1\n? 1 1\n", "1?1\n?00\n"] {
        let p = read(text.as_bytes(), &ReadOptions::default()).unwrap();
        assert_eq!(p.erasures, vec![(0, 1), (1, 0)], "{text}");
        assert!(!p.matrix.is_negative(0, 1) && !p.matrix.is_negative(1, 0));
        let strict = ReadOptions {
            allow_erasures: false,
            ..ReadOptions::default()
        };
        let e = read(text.as_bytes(), &strict).unwrap_err();
        assert!(
            matches!(
                e.location,
                Location::LineCol {
                    line: 1,
                    col: 2 | 3
                }
            ),
            "{text}: {e}"
        );
    }
}

#[test]
fn errors_name_their_place() {
    let cases: &[(&[u8], &str)] = &[
        (b"+-+\n+x+\n", "line 2, column 2: expected '+' or '-', found 'x'"),
        ("\u{feff}\u{2212}+\n+\u{2212}\n+\u{2212}+\n".as_bytes(), "line 3, column 3: row 3 has more than 2 entries (the first row has 2)"),
        (b"++\n+\n", "line 2, column 2: row 2 has 1 entries, expected 2 (the length of the first row)"),
        (b"++\r\n+-\r\n\r\n++\r\n", "line 4, column 1: more rows after the blank line 3 that ended the matrix (one matrix per input)"),
        (b"1,,1\n", "line 1, column 3: empty field: expected +1 or -1 before ','"),
        (b"1,1,\n", "line 1, column 4: empty field: expected +1 or -1 after ','"),
        (b"1 2\n", "line 1, column 3: expected +1 or -1, found '2'"),
        (b"[[1,-1],\n [1, 2]]", "line 2, column 6: expected 1 or -1, found 2"),
        (b"[[1,-1],\n [1]]", "line 2, column 4: row 2 has 1 entries, expected 2 (the length of the first row)"),
        (b"[[1]] x", "line 1, column 7: unexpected 'x' after the end of the matrix"),
        (b"", "empty input: no matrix rows"),
        (b"# only a comment\n\n", "empty input: no matrix rows"),
        (b"\x00\x01\x02", "line 1, column 1: not a matrix in any format read here (pm, int, bits, json, npy): found '\\0'"),
    ];
    for &(input, want) in cases {
        let e = read(input, &ReadOptions::default()).unwrap_err();
        assert_eq!(e.to_string(), want, "{:?}", String::from_utf8_lossy(input));
    }
}

#[test]
fn limits_are_enforced() {
    let opts = ReadOptions {
        max_order: 4,
        ..ReadOptions::default()
    };
    let wide = read(b"+++++\n", &opts).unwrap_err();
    assert_eq!(wide.location, Location::LineCol { line: 1, col: 5 });
    let tall = read(b"+\n+\n+\n+\n+\n", &opts).unwrap_err();
    assert_eq!(tall.location, Location::LineCol { line: 5, col: 1 });
    assert!(read(b"++++\n++++\n", &opts).is_ok());
    let json = read(b"[[1],[1],[1],[1],[1]]", &opts).unwrap_err();
    assert_eq!(json.location, Location::LineCol { line: 1, col: 18 });
}

#[test]
fn bits_header_sets_the_mapping() {
    let a = read(b"# bits: 1 = +1, 0 = -1\n10\n01\n", &ReadOptions::default()).unwrap();
    let b = read(b"01\n10\n", &ReadOptions::default()).unwrap();
    assert_eq!(a.matrix, b.matrix);
    assert!(read(b"# bits: 1 = 2\n10\n", &ReadOptions::default()).is_err());
}

#[test]
fn errors_serialize_with_their_place() {
    let e = read(b"+-\n+x\n", &ReadOptions::default()).unwrap_err();
    let j = serde_json::to_value(&e).unwrap();
    assert_eq!(j["location"], serde_json::json!({"line": 2, "column": 2}));
    let n = ParseError::new(Location::Element(17), "m");
    assert_eq!(
        serde_json::to_value(&n).unwrap()["location"],
        serde_json::json!({"element": 17})
    );
    assert_eq!(n.to_string(), "element 17: m");
}

#[test]
fn format_names() {
    for f in Format::ALL {
        assert_eq!(f.name().parse::<Format>(), Ok(f));
    }
    assert_eq!("CSV".parse::<Format>(), Ok(Format::Int));
    assert!("xls".parse::<Format>().is_err());
    // The download names the API lists are the writers' own names.
    for &s in crate::wire::endpoints::DOWNLOAD_FORMATS {
        assert_eq!(s.parse::<WriteFormat>().map(|w| w.name()), Ok(s));
    }
    // And the upload names are readers' names.
    for &s in crate::wire::endpoints::UPLOAD_FORMATS {
        assert!(s.parse::<Format>().is_ok(), "{s}");
    }
    assert_eq!("int".parse::<WriteFormat>(), Ok(WriteFormat::Csv));
}

proptest! {
    #[test]
    fn random_bytes_never_panic(bytes in proptest::collection::vec(any::<u8>(), 0..400)) {
        let _ = read(&bytes, &ReadOptions::default());
        for f in Format::ALL {
            let _ = read(&bytes, &ReadOptions { format: Some(f), max_order: 64, ..ReadOptions::default() });
        }
    }

    #[test]
    fn damaged_files_never_panic(seed in any::<u64>(), at in any::<usize>(), byte in any::<u8>(), cut in any::<usize>()) {
        let m = pseudo(9, 9, seed);
        for (wf, _) in roundtrip_formats() {
            let mut out = Vec::new();
            write(&m, &wf, &mut out);
            let k = at % out.len();
            out[k] = byte;
            let _ = read(&out, &ReadOptions::default());
            out.truncate(cut % (out.len() + 1));
            let _ = read(&out, &ReadOptions::default());
        }
    }

    #[test]
    fn text_with_noise_reads_like_the_clean_text(seed in any::<u64>(), r in 1usize..20, c in 1usize..80, crlf: bool, bom: bool, spaced: bool) {
        let m = pseudo(r, c, seed);
        let mut text = String::new();
        if bom { text.push('\u{feff}'); }
        text.push_str("# a comment\n");
        for line in m.canonical_text().lines() {
            let line: String = if spaced {
                line.chars().map(|ch| if ch == '-' { "\u{2212} " } else { "+ " }).collect()
            } else { line.to_string() };
            text.push_str(&line);
            text.push_str(if crlf { "\r\n" } else { "\n" });
        }
        text.push_str("\n\n");
        let p = read(text.as_bytes(), &ReadOptions::default()).unwrap();
        prop_assert_eq!(p.format, Format::Pm);
        prop_assert_eq!(p.matrix, m);
    }
}
