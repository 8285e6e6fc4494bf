//! Decompression floor for zlib-compressed appended VTU files: inflate only the blocks of the named
//! arrays, in parallel over blocks (rayon), into a reused buffer; no XML parser, no conversion, no
//! arithmetic; one zlib state per worker, reset between blocks. Uses flate2 with the backend chosen at build time (miniz_oxide by default, zlib-rs with
//! `--features zlib-rs`), the same library ductrace's reader uses.
//!
//! Usage: zfloor ARRAY[,ARRAY...] FILE.vtu [FILE.vtu ...]   (prints the uncompressed byte count)

use rayon::prelude::*;
use std::fs::File;

fn attr<'a>(tag: &'a str, name: &str) -> Option<&'a str> {
    let key = format!(" {name}=\"");
    let i = tag.find(&key)? + key.len();
    let j = tag[i..].find('"')?;
    Some(&tag[i..i + j])
}

fn word(b: &[u8], at: usize, w: usize) -> usize {
    let mut a = [0u8; 8];
    a[..w].copy_from_slice(&b[at..at + w]);
    u64::from_le_bytes(a) as usize
}

fn main() {
    let args: Vec<String> = std::env::args().skip(1).collect();
    if args.len() < 2 {
        eprintln!("usage: zfloor ARRAY[,ARRAY...] FILE.vtu [FILE.vtu ...]");
        std::process::exit(2);
    }
    let names: Vec<&str> = args[0].split(',').collect();
    let mut buf: Vec<u8> = Vec::new();
    let mut total = 0usize;
    for path in &args[1..] {
        let f = File::open(path).unwrap_or_else(|e| panic!("{path}: {e}"));
        // SAFETY: the file is only read, and the benchmark data are not modified while mapped.
        let m = unsafe { memmap2::Mmap::map(&f) }.unwrap_or_else(|e| panic!("{path}: {e}"));
        let app = m.windows(13).position(|w| w == b"<AppendedData").expect("appended data");
        let head = std::str::from_utf8(&m[..app]).expect("utf-8 header");
        let start = app + m[app..].iter().position(|&c| c == b'_').expect("'_'") + 1;
        let w = if head.contains("header_type=\"UInt64\"") { 8 } else { 4 };
        let cell = head.find("<CellData").unwrap_or(0);
        for tag in head[cell..].split("<DataArray").skip(1) {
            let tag = &tag[..tag.find('>').unwrap_or(tag.len())];
            if !attr(tag, "Name").is_some_and(|n| names.contains(&n)) {
                continue;
            }
            let off = start + attr(tag, "offset").and_then(|o| o.parse::<usize>().ok()).expect("offset");
            let (nb, bs, last) = (word(&m, off, w), word(&m, off + w, w), word(&m, off + 2 * w, w));
            let mut starts = Vec::with_capacity(nb + 1);
            let mut pos = off + (3 + nb) * w;
            for i in 0..nb {
                starts.push(pos);
                pos += word(&m, off + (3 + i) * w, w);
            }
            starts.push(pos);
            let ulen = if last == 0 { nb * bs } else { (nb - 1) * bs + last };
            buf.resize(ulen, 0);
            // one zlib state per worker, reset between blocks
            buf.par_chunks_mut(bs).enumerate().for_each_init(
                || flate2::Decompress::new(true),
                |d, (k, dst)| {
                    d.reset(true);
                    d.decompress(&m[starts[k]..starts[k + 1]], dst, flate2::FlushDecompress::Finish)
                        .expect("inflate");
                },
            );
            total += ulen;
        }
    }
    println!("{total}");
}
