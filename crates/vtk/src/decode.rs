//! Decoding of XML DataArray payloads: ascii text, inline base64, appended raw and appended
//! base64 data, with VTK's binary header (UInt32 or UInt64), its block layout for compressed data
//! (zlib, lz4, lzma), both byte orders and all ten numeric types.
//!
//! Binary layout (VTK file format documentation, "Binary data" / "Compressed data"):
//! uncompressed `[nbytes][data]`; compressed `[nblocks][blocksize][last_blocksize][csize_1..csize_n]`
//! then the compressed blocks back to back; header words have the width of `header_type` and the
//! file's byte order. A `last_blocksize` of 0 means the last block is full.
//!
//! Base64: the header and the data may be encoded in one run, or in two runs (the header first,
//! ending in padding, then the data) — VTK writes compressed arrays the second way. The run layout
//! is recognised from the padding at the end of the header's characters.
//!
//! Every declared size is checked against the bytes present and against limits before any
//! allocation. Decoding appends to the caller's buffer.

use std::ops::Range;
use std::path::Path;

use base64::Engine as _;
use base64::engine::{DecodePaddingMode, GeneralPurpose, GeneralPurposeConfig};
use rayon::prelude::*;

use crate::ScalarType;
use crate::error::{Error, Result};

/// Largest uncompressed block size accepted in a block table (VTK's default is 32 KiB).
pub(crate) const MAX_BLOCK_SIZE: u64 = 1 << 30;
/// Largest accepted ratio of uncompressed to compressed bytes of one array (zlib's own maximum is
/// about 1032; lzma of constant data reaches a few thousand).
pub(crate) const MAX_RATIO: u64 = 1 << 15;
/// Largest array, in bytes, decoded at all.
pub(crate) const MAX_ARRAY_BYTES: u64 = 1 << 38;
/// Compressed arrays with at least this many blocks are decompressed in parallel.
const PAR_MIN_BLOCKS: usize = 4;
/// Base64 text decoded per step when streaming into the output.
const B64_CHUNK_CHARS: usize = 1 << 20;

/// The base64 engine: standard alphabet, padding optional, lenient trailing bits.
pub(crate) const B64: GeneralPurpose = GeneralPurpose::new(
    &base64::alphabet::STANDARD,
    GeneralPurposeConfig::new()
        .with_decode_padding_mode(DecodePaddingMode::Indifferent)
        .with_decode_allow_trailing_bits(true),
);

/// Width of the words in the binary header.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub(crate) enum HeaderType {
    /// `UInt32` (default when the attribute is absent).
    U32,
    /// `UInt64`.
    U64,
}

impl HeaderType {
    pub(crate) fn width(self) -> usize {
        match self {
            HeaderType::U32 => 4,
            HeaderType::U64 => 8,
        }
    }
    pub(crate) fn name(self) -> &'static str {
        match self {
            HeaderType::U32 => "UInt32",
            HeaderType::U64 => "UInt64",
        }
    }
}

/// Block compressor named by the `compressor` attribute.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub(crate) enum Compressor {
    /// No compression.
    None,
    /// `vtkZLibDataCompressor`: each block a zlib stream.
    Zlib,
    /// `vtkLZ4DataCompressor`: each block an lz4 raw block.
    Lz4,
    /// `vtkLZMADataCompressor`: each block an xz stream.
    Lzma,
}

impl Compressor {
    pub(crate) fn name(self) -> &'static str {
        match self {
            Compressor::None => "no compression",
            Compressor::Zlib => "zlib",
            Compressor::Lz4 => "lz4",
            Compressor::Lzma => "lzma",
        }
    }
}

/// File-wide settings that govern binary payloads.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub(crate) struct Layout {
    pub header: HeaderType,
    pub compressor: Compressor,
    pub big_endian: bool,
}

/// Where an array's payload is, in the mapped file.
#[derive(Clone, Debug, PartialEq, Eq)]
pub(crate) enum Payload {
    /// `format="ascii"`: byte span of the text.
    Ascii(Range<usize>),
    /// `format="binary"`: byte span of the base64 text.
    Inline(Range<usize>),
    /// Appended raw: absolute byte offset of the array's header in the file.
    AppendedRaw(usize),
    /// Appended base64: absolute byte offset of the array's first base64 character.
    AppendedBase64(usize),
}

/// Context for error messages: the file and a description of the array.
#[derive(Clone, Copy)]
pub(crate) struct Ctx<'a> {
    pub path: &'a Path,
    pub what: &'a str,
}

impl Ctx<'_> {
    fn corrupt(&self, detail: impl Into<String>) -> Error {
        Error::Corrupt {
            path: self.path.to_path_buf(),
            what: self.what.to_string(),
            detail: detail.into(),
        }
    }
    fn truncated(&self, offset: usize, needed: usize, available: usize) -> Error {
        Error::Truncated {
            path: self.path.to_path_buf(),
            what: self.what.to_string(),
            offset: offset as u64,
            needed: needed as u64,
            available: available as u64,
        }
    }
    fn limit(&self, detail: String) -> Error {
        Error::Limit {
            path: self.path.to_path_buf(),
            what: self.what.to_string(),
            detail,
        }
    }
    fn mismatch(&self, what: &str, expected: u64, found: u64) -> Error {
        Error::SizeMismatch {
            path: self.path.to_path_buf(),
            what: format!("{what} of {}", self.what),
            expected,
            found,
        }
    }
}

/// A request: decode elements `elems` (element = one scalar) of an array with `total` elements.
#[derive(Clone, Debug)]
pub(crate) struct Request {
    pub ty: ScalarType,
    pub total: usize,
    pub elems: Range<usize>,
}

/// Receives decoded values.
pub(crate) trait Sink {
    /// Append values from `bytes` (a whole number of elements of `ty`).
    fn bytes(&mut self, bytes: &[u8], ty: ScalarType, big_endian: bool) -> Result<(), String>;
    /// Append one value parsed from ascii text.
    fn token(&mut self, tok: &str, ty: ScalarType) -> Result<(), String>;
    /// Reserve room for `n` more values.
    fn reserve(&mut self, n: usize);
    /// Values received so far.
    fn len(&self) -> usize;
    /// Drops values beyond the first `n`.
    fn truncate(&mut self, n: usize);
}

macro_rules! conv_loop {
    ($bytes:expr, $out:expr, $t:ty, $n:literal, $big:expr, $map:expr) => {{
        let it = $bytes.chunks_exact($n).map(|c| {
            let mut a = [0u8; $n];
            a.copy_from_slice(c);
            if $big {
                <$t>::from_be_bytes(a)
            } else {
                <$t>::from_le_bytes(a)
            }
        });
        $out.extend(it.map($map));
    }};
}

/// Converts raw bytes of any numeric type to f64, appending.
pub(crate) fn bytes_to_f64(bytes: &[u8], ty: ScalarType, big: bool, out: &mut Vec<f64>) {
    match ty {
        ScalarType::Float64 => {
            if big {
                conv_loop!(bytes, out, f64, 8, true, |v| v)
            } else {
                out.extend(bytes.chunks_exact(8).map(|c| {
                    let mut a = [0u8; 8];
                    a.copy_from_slice(c);
                    f64::from_le_bytes(a)
                }))
            }
        }
        ScalarType::Float32 => conv_loop!(bytes, out, f32, 4, big, f64::from),
        ScalarType::Int8 => out.extend(bytes.iter().map(|&b| f64::from(b as i8))),
        ScalarType::UInt8 => out.extend(bytes.iter().map(|&b| f64::from(b))),
        ScalarType::Int16 => conv_loop!(bytes, out, i16, 2, big, f64::from),
        ScalarType::UInt16 => conv_loop!(bytes, out, u16, 2, big, f64::from),
        ScalarType::Int32 => conv_loop!(bytes, out, i32, 4, big, f64::from),
        ScalarType::UInt32 => conv_loop!(bytes, out, u32, 4, big, f64::from),
        ScalarType::Int64 => conv_loop!(bytes, out, i64, 8, big, |v| v as f64),
        ScalarType::UInt64 => conv_loop!(bytes, out, u64, 8, big, |v| v as f64),
    }
}

/// Sink producing f64 values (integers above 2^53 lose precision, as in any f64 conversion).
pub(crate) struct F64Sink<'a>(pub &'a mut Vec<f64>);

impl Sink for F64Sink<'_> {
    fn bytes(&mut self, bytes: &[u8], ty: ScalarType, big: bool) -> Result<(), String> {
        bytes_to_f64(bytes, ty, big, self.0);
        Ok(())
    }
    fn token(&mut self, tok: &str, ty: ScalarType) -> Result<(), String> {
        let v = if ty.is_float() {
            tok.parse::<f64>().ok()
        } else {
            tok.parse::<i64>()
                .map(|v| v as f64)
                .ok()
                .or_else(|| tok.parse::<u64>().ok().map(|v| v as f64))
        };
        match v {
            Some(v) => {
                self.0.push(v);
                Ok(())
            }
            None => Err(format!("'{}' is not a {ty} number", short(tok))),
        }
    }
    fn reserve(&mut self, n: usize) {
        self.0.reserve(n);
    }
    fn len(&self) -> usize {
        self.0.len()
    }
    fn truncate(&mut self, n: usize) {
        self.0.truncate(n);
    }
}

/// Sink producing i64 values (for connectivity, offsets and types); float types are refused
/// by the caller before decoding.
pub(crate) struct I64Sink<'a>(pub &'a mut Vec<i64>);

/// Appends integers that always fit in i64 (every type but UInt64): no range check, so the
/// loop vectorises.
macro_rules! int_extend {
    ($bytes:expr, $out:expr, $t:ty, $n:literal, $big:expr) => {{
        let it = $bytes.chunks_exact($n).map(|c| {
            let mut a = [0u8; $n];
            a.copy_from_slice(c);
            if $big {
                <$t>::from_be_bytes(a)
            } else {
                <$t>::from_le_bytes(a)
            }
        });
        $out.extend(it.map(i64::from));
    }};
}

macro_rules! int_loop {
    ($bytes:expr, $out:expr, $t:ty, $n:literal, $big:expr) => {{
        for c in $bytes.chunks_exact($n) {
            let mut a = [0u8; $n];
            a.copy_from_slice(c);
            let v = if $big {
                <$t>::from_be_bytes(a)
            } else {
                <$t>::from_le_bytes(a)
            };
            match i64::try_from(v) {
                Ok(v) => $out.push(v),
                Err(_) => return Err(format!("integer {v} is out of range")),
            }
        }
    }};
}

impl Sink for I64Sink<'_> {
    fn bytes(&mut self, bytes: &[u8], ty: ScalarType, big: bool) -> Result<(), String> {
        let out = &mut *self.0;
        match ty {
            ScalarType::Int8 => out.extend(bytes.iter().map(|&b| i64::from(b as i8))),
            ScalarType::UInt8 => out.extend(bytes.iter().map(|&b| i64::from(b))),
            ScalarType::Int16 => int_extend!(bytes, out, i16, 2, big),
            ScalarType::UInt16 => int_extend!(bytes, out, u16, 2, big),
            ScalarType::Int32 => int_extend!(bytes, out, i32, 4, big),
            ScalarType::UInt32 => int_extend!(bytes, out, u32, 4, big),
            ScalarType::Int64 => int_extend!(bytes, out, i64, 8, big),
            ScalarType::UInt64 => int_loop!(bytes, out, u64, 8, big),
            ScalarType::Float32 | ScalarType::Float64 => {
                return Err(format!("integer data expected, found {ty}"));
            }
        }
        Ok(())
    }
    fn token(&mut self, tok: &str, _ty: ScalarType) -> Result<(), String> {
        match tok.parse::<i64>() {
            Ok(v) => {
                self.0.push(v);
                Ok(())
            }
            Err(_) => Err(format!("'{}' is not an integer", short(tok))),
        }
    }
    fn reserve(&mut self, n: usize) {
        self.0.reserve(n);
    }
    fn len(&self) -> usize {
        self.0.len()
    }
    fn truncate(&mut self, n: usize) {
        self.0.truncate(n);
    }
}

fn short(tok: &str) -> String {
    tok.chars().take(32).collect()
}

/// Decodes elements `req.elems` of the array whose payload is `payload` in `file`.
///
/// `scratch` is a reusable byte buffer for decompression and base64.
pub(crate) fn decode(
    file: &[u8],
    payload: &Payload,
    layout: Layout,
    req: &Request,
    ctx: Ctx<'_>,
    scratch: &mut Vec<u8>,
    sink: &mut dyn Sink,
) -> Result<()> {
    if req.elems.start > req.elems.end || req.elems.end > req.total {
        return Err(ctx.corrupt(format!(
            "element range {}..{} outside 0..{}",
            req.elems.start, req.elems.end, req.total
        )));
    }
    match payload {
        Payload::Ascii(span) => {
            let text = file.get(span.clone()).ok_or_else(|| {
                ctx.truncated(
                    span.start,
                    span.len(),
                    file.len().saturating_sub(span.start),
                )
            })?;
            decode_ascii(text, req, ctx, sink)
        }
        Payload::Inline(span) => {
            let text = file.get(span.clone()).ok_or_else(|| {
                ctx.truncated(
                    span.start,
                    span.len(),
                    file.len().saturating_sub(span.start),
                )
            })?;
            let lead = text
                .iter()
                .position(|b| !b.is_ascii_whitespace())
                .unwrap_or(text.len());
            let text = trim_ascii(text);
            let file_offset = span.start + lead;
            let before = sink.len();
            // fast path: base64 without inner whitespace (what VTK writes); on any failure, retry
            // with whitespace removed if there is some
            match decode_binary(
                &Stream::B64 { text, file_offset },
                layout,
                req,
                ctx,
                scratch,
                sink,
            ) {
                Err(e) => {
                    if !text.iter().any(u8::is_ascii_whitespace) {
                        return Err(e);
                    }
                    sink.truncate(before);
                    let cleaned: Vec<u8> = text
                        .iter()
                        .copied()
                        .filter(|b| !b.is_ascii_whitespace())
                        .collect();
                    decode_binary(
                        &Stream::B64 {
                            text: &cleaned,
                            file_offset,
                        },
                        layout,
                        req,
                        ctx,
                        scratch,
                        sink,
                    )
                }
                ok => ok,
            }
        }
        Payload::AppendedRaw(off) => {
            let bytes = file.get(*off..).unwrap_or(&[]);
            let stream = Stream::Raw {
                bytes,
                file_offset: *off,
            };
            decode_binary(&stream, layout, req, ctx, scratch, sink)
        }
        Payload::AppendedBase64(off) => {
            let text = file.get(*off..).unwrap_or(&[]);
            let stream = Stream::B64 {
                text,
                file_offset: *off,
            };
            decode_binary(&stream, layout, req, ctx, scratch, sink)
        }
    }
}

fn trim_ascii(mut t: &[u8]) -> &[u8] {
    while let [first, rest @ ..] = t {
        if first.is_ascii_whitespace() {
            t = rest;
        } else {
            break;
        }
    }
    while let [rest @ .., last] = t {
        if last.is_ascii_whitespace() {
            t = rest;
        } else {
            break;
        }
    }
    t
}

fn decode_ascii(text: &[u8], req: &Request, ctx: Ctx<'_>, sink: &mut dyn Sink) -> Result<()> {
    // every value needs at least one character and one separator
    let needed = req.total.saturating_mul(2).saturating_sub(1);
    if text.len() < needed {
        return Err(ctx.mismatch(
            "number of ascii values",
            req.total as u64,
            count_tokens(text) as u64,
        ));
    }
    let s = std::str::from_utf8(text).map_err(|e| ctx.corrupt(format!("ascii data: {e}")))?;
    sink.reserve(req.elems.len());
    let mut n = 0usize;
    for tok in s.split_ascii_whitespace() {
        if n >= req.elems.start && n < req.elems.end {
            sink.token(tok, req.ty)
                .map_err(|e| ctx.corrupt(format!("value {n}: {e}")))?;
        }
        n += 1;
        if n > req.total {
            break;
        }
    }
    if n != req.total {
        let found = if n > req.total { count_tokens(text) } else { n };
        return Err(ctx.mismatch("number of ascii values", req.total as u64, found as u64));
    }
    Ok(())
}

fn count_tokens(text: &[u8]) -> usize {
    text.split(u8::is_ascii_whitespace)
        .filter(|t| !t.is_empty())
        .count()
}

/// The binary stream of one array: its header followed by its data.
enum Stream<'a> {
    /// Raw bytes from the header's first byte to the end of the file.
    Raw { bytes: &'a [u8], file_offset: usize },
    /// Base64 text from the first character to the end of the run (inline) or of the file
    /// (appended), whitespace-free.
    B64 { text: &'a [u8], file_offset: usize },
}

/// The data part of a binary stream.
enum DataView<'a> {
    Raw {
        bytes: &'a [u8],
        file_offset: usize,
    },
    /// `text` starts at a group boundary; data byte `d` is decoded byte `skew + d` of `text`.
    B64 {
        text: &'a [u8],
        skew: usize,
        file_offset: usize,
    },
}

impl<'a> Stream<'a> {
    fn file_offset(&self) -> usize {
        match self {
            Stream::Raw { file_offset, .. } | Stream::B64 { file_offset, .. } => *file_offset,
        }
    }

    /// Bytes `0..n` of the stream (within the first base64 run).
    fn head(&self, n: usize, ctx: Ctx<'_>, buf: &mut Vec<u8>) -> Result<()> {
        buf.clear();
        match self {
            Stream::Raw { bytes, file_offset } => {
                let b = bytes
                    .get(..n)
                    .ok_or_else(|| ctx.truncated(*file_offset, n, bytes.len()))?;
                buf.extend_from_slice(b);
            }
            Stream::B64 { text, file_offset } => {
                let chars = n.div_ceil(3) * 4;
                let t = text
                    .get(..chars)
                    .ok_or_else(|| ctx.truncated(*file_offset, chars, text.len()))?;
                let got = b64_into(t, *file_offset, buf, ctx)?;
                if got < n {
                    return Err(ctx.truncated(*file_offset, chars, text.len()));
                }
                buf.truncate(n);
            }
        }
        Ok(())
    }

    /// The data view after a header of `h` bytes.
    fn data(&self, h: usize) -> DataView<'a> {
        match *self {
            Stream::Raw { bytes, file_offset } => DataView::Raw {
                bytes: bytes.get(h..).unwrap_or(&[]),
                file_offset: file_offset + h,
            },
            Stream::B64 { text, file_offset } => {
                let hc = h.div_ceil(3) * 4;
                let two_runs = h.is_multiple_of(3) || (hc >= 1 && text.get(hc - 1) == Some(&b'='));
                if two_runs {
                    DataView::B64 {
                        text: text.get(hc..).unwrap_or(&[]),
                        skew: 0,
                        file_offset: file_offset + hc,
                    }
                } else {
                    DataView::B64 {
                        text,
                        skew: h,
                        file_offset,
                    }
                }
            }
        }
    }
}

/// Decodes base64 `text` (whitespace-free) into the start of `out`, growing it if needed (never
/// shrinking or clearing it, so a reused buffer costs nothing); returns the decoded length.
fn b64_into(text: &[u8], base: usize, out: &mut Vec<u8>, ctx: Ctx<'_>) -> Result<usize> {
    let need = text.len().div_ceil(4) * 3;
    if out.len() < need {
        out.resize(need, 0);
    }
    B64.decode_slice(text, &mut out[..need]).map_err(|e| {
        use base64::{DecodeError, DecodeSliceError};
        ctx.corrupt(match e {
            DecodeSliceError::DecodeError(DecodeError::InvalidByte(at, b)) => format!(
                "base64: invalid character {:?} at byte offset {}",
                char::from(b),
                base + at
            ),
            DecodeSliceError::DecodeError(DecodeError::InvalidLength(n)) => {
                format!("base64: the text ends inside a 4-character group ({n} symbols)")
            }
            DecodeSliceError::DecodeError(DecodeError::InvalidLastSymbol(at, b)) => format!(
                "base64: invalid last character {:?} at byte offset {}",
                char::from(b),
                base + at
            ),
            DecodeSliceError::DecodeError(DecodeError::InvalidPadding) => {
                "base64: misplaced padding".to_string()
            }
            DecodeSliceError::OutputSliceTooSmall => "base64: output too small".to_string(),
        })
    })
}

impl DataView<'_> {
    /// Bytes available (decoded length for base64).
    fn available(&self) -> usize {
        match self {
            DataView::Raw { bytes, .. } => bytes.len(),
            DataView::B64 { text, skew, .. } => {
                // padding is counted as data here; the decoder rejects what is not
                (text.len() / 4 * 3 + (text.len() % 4).saturating_sub(1)).saturating_sub(*skew)
            }
        }
    }

    fn file_offset(&self) -> usize {
        match self {
            DataView::Raw { file_offset, .. } | DataView::B64 { file_offset, .. } => *file_offset,
        }
    }

    /// Data bytes `r`, borrowed from the file (raw) or decoded into `buf` (base64).
    fn get<'s>(&'s self, r: Range<usize>, ctx: Ctx<'_>, buf: &'s mut Vec<u8>) -> Result<&'s [u8]> {
        match self {
            DataView::Raw { bytes, file_offset } => bytes.get(r.clone()).ok_or_else(|| {
                ctx.truncated(
                    file_offset + r.start,
                    r.len(),
                    bytes.len().saturating_sub(r.start),
                )
            }),
            DataView::B64 {
                text,
                skew,
                file_offset,
            } => {
                let (s, e) = (r.start + skew, r.end + skew);
                let c0 = s / 3 * 4;
                let c1 = e.div_ceil(3) * 4;
                let t = text.get(c0..c1.min(text.len())).unwrap_or(&[]);
                let got = b64_into(t, file_offset + c0, buf, ctx)?;
                let lo = s - s / 3 * 3;
                let hi = lo + r.len();
                if got < hi {
                    return Err(ctx.truncated(file_offset + c0, c1 - c0, t.len()));
                }
                Ok(&buf[lo..hi])
            }
        }
    }
}

fn read_words(bytes: &[u8], w: usize, big: bool) -> impl Iterator<Item = u64> + '_ {
    bytes.chunks_exact(w).map(move |c| {
        if w == 4 {
            let mut a = [0u8; 4];
            a.copy_from_slice(c);
            u64::from(if big {
                u32::from_be_bytes(a)
            } else {
                u32::from_le_bytes(a)
            })
        } else {
            let mut a = [0u8; 8];
            a.copy_from_slice(c);
            if big {
                u64::from_be_bytes(a)
            } else {
                u64::from_le_bytes(a)
            }
        }
    })
}

fn decode_binary(
    stream: &Stream<'_>,
    layout: Layout,
    req: &Request,
    ctx: Ctx<'_>,
    scratch: &mut Vec<u8>,
    sink: &mut dyn Sink,
) -> Result<()> {
    let size = req.ty.size();
    let expected = (req.total as u64)
        .checked_mul(size as u64)
        .filter(|&n| n <= MAX_ARRAY_BYTES)
        .ok_or_else(|| {
            ctx.limit(format!(
                "{} values of {} bytes (limit {MAX_ARRAY_BYTES} bytes)",
                req.total, size
            ))
        })?;
    let w = layout.header.width();
    let big = layout.big_endian;
    let mut head = Vec::new();
    match layout.compressor {
        Compressor::None => {
            stream.head(w, ctx, &mut head)?;
            let nbytes = read_words(&head, w, big).next().unwrap_or(0);
            if nbytes != expected {
                return Err(ctx.mismatch("byte count in the binary header", expected, nbytes));
            }
            let data = stream.data(w);
            let avail = data.available();
            if (avail as u64) < nbytes {
                return Err(ctx.truncated(data.file_offset(), nbytes as usize, avail));
            }
            let r = req.elems.start * size..req.elems.end * size;
            sink.reserve(req.elems.len());
            match &data {
                DataView::Raw { .. } => {
                    let b = data.get(r, ctx, scratch)?;
                    sink.bytes(b, req.ty, big).map_err(|e| ctx.corrupt(e))?;
                }
                DataView::B64 { .. } => {
                    // stream in chunks of whole elements so the scratch stays small
                    let chunk = (B64_CHUNK_CHARS / 4 * 3) / size * size;
                    let chunk = chunk.max(size);
                    let mut pos = r.start;
                    while pos < r.end {
                        let end = (pos + chunk).min(r.end);
                        let b = data.get(pos..end, ctx, scratch)?;
                        sink.bytes(b, req.ty, big).map_err(|e| ctx.corrupt(e))?;
                        pos = end;
                    }
                }
            }
            Ok(())
        }
        comp => {
            stream.head(3 * w, ctx, &mut head)?;
            let words: Vec<u64> = read_words(&head, w, big).collect();
            let (nblocks, bs, last) = match words[..] {
                [a, b, c] => (a, b, c),
                _ => return Err(ctx.corrupt("short block table")),
            };
            let table_avail = match stream {
                Stream::Raw { bytes, .. } => bytes.len() as u64,
                Stream::B64 { text, .. } => text.len() as u64 / 4 * 3,
            };
            if nblocks.saturating_mul(w as u64) > table_avail {
                return Err(ctx.truncated(
                    stream.file_offset(),
                    usize::try_from(nblocks.saturating_mul(w as u64)).unwrap_or(usize::MAX),
                    table_avail as usize,
                ));
            }
            if bs > MAX_BLOCK_SIZE {
                return Err(ctx.limit(format!(
                    "block size {bs} in the block table (limit {MAX_BLOCK_SIZE})"
                )));
            }
            if last > bs {
                return Err(ctx.corrupt(format!(
                    "block table: last block size {last} exceeds block size {bs}"
                )));
            }
            if nblocks > 0 && bs == 0 {
                return Err(ctx.corrupt("block table: block size 0"));
            }
            let total = if nblocks == 0 {
                0
            } else if last == 0 {
                nblocks.saturating_mul(bs)
            } else {
                (nblocks - 1).saturating_mul(bs).saturating_add(last)
            };
            if total != expected {
                return Err(ctx.mismatch(
                    "uncompressed byte count in the block table",
                    expected,
                    total,
                ));
            }
            let nb = nblocks as usize;
            let h = (3 + nb) * w;
            stream.head(h, ctx, &mut head)?;
            let csizes: Vec<u64> = read_words(&head[3 * w..], w, big).collect();
            let data = stream.data(h);
            let csum: u64 = csizes.iter().fold(0u64, |a, &c| a.saturating_add(c));
            let avail = data.available() as u64;
            if csum > avail {
                return Err(ctx.truncated(data.file_offset(), csum as usize, avail as usize));
            }
            if total > csum.saturating_mul(MAX_RATIO).saturating_add(1 << 16) {
                return Err(ctx.limit(format!(
                    "{total} uncompressed bytes from {csum} compressed (ratio limit {MAX_RATIO})"
                )));
            }
            let bs = bs as usize;
            // blocks covering the requested bytes
            let r = req.elems.start * size..req.elems.end * size;
            if r.is_empty() {
                return Ok(());
            }
            let b0 = r.start / bs;
            let b1 = (r.end - 1) / bs + 1;
            let mut starts = Vec::with_capacity(nb + 1);
            let mut acc = 0usize;
            for &c in &csizes {
                starts.push(acc);
                acc += c as usize;
            }
            starts.push(acc);
            // compressed bytes of blocks b0..b1
            let mut cbuf = Vec::new();
            let comp_bytes = data.get(starts[b0]..starts[b1], ctx, &mut cbuf)?;
            let ublock = |k: usize| -> usize {
                if k + 1 == nb && last != 0 {
                    last as usize
                } else {
                    bs
                }
            };
            let ustart = b0 * bs;
            let ulen: usize = (b0..b1).map(ublock).sum();
            scratch.clear();
            scratch.resize(ulen, 0);
            let base = starts[b0];
            let jobs: Vec<(usize, &[u8])> = (b0..b1)
                .map(|k| (k, &comp_bytes[starts[k] - base..starts[k + 1] - base]))
                .collect();
            // one zlib state per worker, reset between blocks (its setup costs about as much
            // as inflating a small block)
            let run = |z: &mut Option<flate2::Decompress>,
                       (k, src): &(usize, &[u8]),
                       dst: &mut [u8]|
             -> Result<()> {
                decompress_block_with(comp, z, src, dst)
                    .map_err(|e| ctx.corrupt(format!("block {k}: {e}")))
            };
            if jobs.len() >= PAR_MIN_BLOCKS {
                scratch
                    .par_chunks_mut(bs)
                    .zip(jobs.par_iter())
                    .try_for_each_init(|| None, |z, (dst, job)| run(z, job, dst))?;
            } else {
                let mut z = None;
                for (dst, job) in scratch.chunks_mut(bs).zip(jobs.iter()) {
                    run(&mut z, job, dst)?;
                }
            }
            let lo = r.start - ustart;
            sink.reserve(req.elems.len());
            sink.bytes(&scratch[lo..lo + r.len()], req.ty, big)
                .map_err(|e| ctx.corrupt(e))?;
            Ok(())
        }
    }
}

/// A writer into a fixed slice that refuses to overflow.
struct SliceWriter<'a> {
    buf: &'a mut [u8],
    pos: usize,
}

impl std::io::Write for SliceWriter<'_> {
    fn write(&mut self, data: &[u8]) -> std::io::Result<usize> {
        let room = self.buf.len() - self.pos;
        if data.len() > room {
            return Err(std::io::Error::other(
                "block decompresses to more bytes than the block table says",
            ));
        }
        self.buf[self.pos..self.pos + data.len()].copy_from_slice(data);
        self.pos += data.len();
        Ok(data.len())
    }
    fn flush(&mut self) -> std::io::Result<()> {
        Ok(())
    }
}

/// Decompresses one block into exactly `dst.len()` bytes.
#[cfg(test)]
pub(crate) fn decompress_block(comp: Compressor, src: &[u8], dst: &mut [u8]) -> Result<(), String> {
    decompress_block_with(comp, &mut None, src, dst)
}

/// Decompresses one block into exactly `dst.len()` bytes, reusing the zlib state in `z`.
fn decompress_block_with(
    comp: Compressor,
    z: &mut Option<flate2::Decompress>,
    src: &[u8],
    dst: &mut [u8],
) -> Result<(), String> {
    let n = match comp {
        Compressor::None => {
            if src.len() != dst.len() {
                return Err("stored block size mismatch".into());
            }
            dst.copy_from_slice(src);
            dst.len()
        }
        Compressor::Zlib => {
            let d = match z {
                Some(d) => {
                    d.reset(true);
                    d
                }
                None => z.insert(flate2::Decompress::new(true)),
            };
            let status = d
                .decompress(src, dst, flate2::FlushDecompress::Finish)
                .map_err(|e| format!("zlib: {}", e.to_string().to_lowercase()))?;
            match status {
                flate2::Status::StreamEnd => d.total_out() as usize,
                _ => {
                    return Err(if d.total_out() as usize == dst.len() {
                        "zlib: block decompresses to more bytes than the block table says".into()
                    } else {
                        "zlib: stream ends early".into()
                    });
                }
            }
        }
        Compressor::Lz4 => lz4_flex::block::decompress_into(src, dst)
            .map_err(|e| format!("lz4: {}", e.to_string().to_lowercase()))?,
        Compressor::Lzma => {
            // xz stream footer: CRC32, backward size, flags, "YZ" (xz file format 1.0.4, §2.1.2);
            // a backward size beyond the block is refused here (lzma-rs 0.3 overflows on it)
            if let Some(f) = src.len().checked_sub(8).and_then(|i| src.get(i..i + 4)) {
                let mut a = [0u8; 4];
                a.copy_from_slice(f);
                let backward = (u64::from(u32::from_le_bytes(a)) + 1) * 4;
                if backward > src.len() as u64 {
                    return Err("lzma: xz footer gives an index larger than the block".into());
                }
            }
            let mut w = SliceWriter { buf: dst, pos: 0 };
            let mut r = std::io::BufReader::new(src);
            // last line of defence against a panic inside the third-party decoder on hostile
            // input: report it as corrupt data
            let res = std::panic::catch_unwind(std::panic::AssertUnwindSafe(|| {
                lzma_rs::xz_decompress(&mut r, &mut w)
            }))
            .map_err(|_| "lzma: the decoder failed on malformed data".to_string())?;
            res.map_err(|e| format!("lzma: {}", e.to_string().to_lowercase()))?;
            w.pos
        }
    };
    if n != dst.len() {
        return Err(format!(
            "block decompresses to {n} bytes, the block table says {}",
            dst.len()
        ));
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    //! Each decoder path on payloads built here with the reference libraries (base64, flate2,
    //! lz4_flex, lzma-rs through `testenc`), following VTK's binary layout.
    use super::*;
    use crate::testenc::{self, Comp, Enc, Format};
    use base64::engine::general_purpose::STANDARD;

    fn layout(enc: &Enc) -> Layout {
        Layout {
            header: if enc.header64 {
                HeaderType::U64
            } else {
                HeaderType::U32
            },
            compressor: match enc.comp {
                Comp::None => Compressor::None,
                Comp::Zlib => Compressor::Zlib,
                Comp::Lz4 => Compressor::Lz4,
                Comp::Lzma => Compressor::Lzma,
            },
            big_endian: enc.big_endian,
        }
    }

    /// Encodes `values` as `ty` under `enc` into a file image and its payload.
    fn image(enc: &Enc, ty: ScalarType, values: &[f64]) -> (Vec<u8>, Payload) {
        let raw = testenc::raw_bytes(values, ty, enc.big_endian);
        let (h, d) = testenc::binary(enc, &raw);
        let pad = b"xx".to_vec(); // payload not at offset 0
        match enc.format {
            Format::AppendedRaw => {
                let mut f = pad.clone();
                f.extend(&h);
                f.extend(&d);
                f.extend(b"trailing");
                (f, Payload::AppendedRaw(pad.len()))
            }
            Format::AppendedBase64 | Format::InlineTwoRuns => {
                let t = format!("{}{}", STANDARD.encode(&h), STANDARD.encode(&d));
                let mut f = pad.clone();
                f.extend(t.as_bytes());
                let p = if enc.format == Format::InlineTwoRuns {
                    Payload::Inline(pad.len()..f.len())
                } else {
                    Payload::AppendedBase64(pad.len())
                };
                (f, p)
            }
            Format::InlineOneRun => {
                let t = STANDARD.encode([h, d].concat());
                let mut f = pad.clone();
                f.extend(b"\n   ");
                f.extend(t.as_bytes());
                f.extend(b"\n ");
                (f.clone(), Payload::Inline(pad.len()..f.len()))
            }
            Format::Ascii => {
                let t: Vec<String> = values.iter().map(|v| format!("{v:?}")).collect();
                let mut f = pad.clone();
                f.extend(t.join("\n ").as_bytes());
                (f.clone(), Payload::Ascii(pad.len()..f.len()))
            }
        }
    }

    fn run(enc: &Enc, ty: ScalarType, values: &[f64], elems: Range<usize>) -> Result<Vec<f64>> {
        let (file, payload) = image(enc, ty, values);
        let mut out = Vec::new();
        let mut scratch = Vec::new();
        decode(
            &file,
            &payload,
            layout(enc),
            &Request {
                ty,
                total: values.len(),
                elems,
            },
            Ctx {
                path: Path::new("t.vtu"),
                what: "array 'a'",
            },
            &mut scratch,
            &mut F64Sink(&mut out),
        )?;
        Ok(out)
    }

    fn values(n: usize) -> Vec<f64> {
        (0..n).map(|i| (i as f64) * 0.375 - 7.0).collect()
    }

    #[test]
    fn every_layout_full_and_partial() {
        // 100 values of 8 bytes in blocks of 96 bytes: 9 blocks, last partial (800 % 96 = 32)
        for enc in testenc::all_encodings(96) {
            let v = values(100);
            assert_eq!(
                run(&enc, ScalarType::Float64, &v, 0..100).unwrap(),
                v,
                "{enc:?}"
            );
            assert_eq!(
                run(&enc, ScalarType::Float64, &v, 37..61).unwrap(),
                v[37..61],
                "{enc:?}"
            );
            assert!(
                run(&enc, ScalarType::Float64, &v, 50..50)
                    .unwrap()
                    .is_empty()
            );
        }
    }

    #[test]
    fn last_block_full_means_zero_last_size() {
        // 800 bytes in blocks of 100: last_blocksize written as 0 (VTK's convention)
        for comp in [Comp::Zlib, Comp::Lz4, Comp::Lzma] {
            let enc = Enc {
                comp,
                block_size: 100,
                ..Enc::default()
            };
            let v = values(100);
            assert_eq!(run(&enc, ScalarType::Float64, &v, 0..100).unwrap(), v);
        }
    }

    #[test]
    fn all_types_both_orders() {
        let v: Vec<f64> = (0..50).map(|i| f64::from(i * 5 % 120)).collect();
        for ty in [
            ScalarType::Int8,
            ScalarType::UInt8,
            ScalarType::Int16,
            ScalarType::UInt16,
            ScalarType::Int32,
            ScalarType::UInt32,
            ScalarType::Int64,
            ScalarType::UInt64,
            ScalarType::Float32,
            ScalarType::Float64,
        ] {
            for big_endian in [false, true] {
                for format in [Format::AppendedRaw, Format::InlineOneRun] {
                    let enc = Enc {
                        big_endian,
                        format,
                        ..Enc::default()
                    };
                    assert_eq!(run(&enc, ty, &v, 0..50).unwrap(), v, "{ty} {enc:?}");
                }
            }
        }
    }

    #[test]
    fn negative_integers_and_float32_rounding() {
        let v = [-128.0, -1.0, 0.0, 127.0];
        let enc = Enc::default();
        assert_eq!(run(&enc, ScalarType::Int8, &v, 0..4).unwrap(), v);
        let f = [0.1f64];
        let got = run(&enc, ScalarType::Float32, &f, 0..1).unwrap();
        assert_eq!(got, [f64::from(0.1f32)]);
    }

    #[test]
    fn header_byte_count_mismatch() {
        let enc = Enc::default();
        let (file, payload) = image(&enc, ScalarType::Float64, &values(10));
        let mut out = Vec::new();
        let e = decode(
            &file,
            &payload,
            layout(&enc),
            &Request {
                ty: ScalarType::Float64,
                total: 11,
                elems: 0..11,
            },
            Ctx {
                path: Path::new("t.vtu"),
                what: "array 'a'",
            },
            &mut Vec::new(),
            &mut F64Sink(&mut out),
        )
        .unwrap_err()
        .to_string();
        assert!(e.contains("expected 88, found 80"), "{e}");
    }

    #[test]
    fn block_decompressing_to_more_than_declared_is_refused() {
        let data = vec![7u8; 200];
        let z = testenc::compress(Comp::Zlib, &data);
        let mut dst = vec![0u8; 100];
        assert!(decompress_block(Compressor::Zlib, &z, &mut dst).is_err());
        let l = testenc::compress(Comp::Lz4, &data);
        assert!(decompress_block(Compressor::Lz4, &l, &mut dst).is_err());
        let x = testenc::compress(Comp::Lzma, &data);
        assert!(decompress_block(Compressor::Lzma, &x, &mut dst).is_err());
        let mut exact = vec![0u8; 200];
        decompress_block(Compressor::Lzma, &x, &mut exact).unwrap();
        assert_eq!(exact, data);
    }

    #[test]
    fn inline_base64_with_line_breaks() {
        // some writers wrap base64 text at 76 characters
        let v = values(40);
        let raw = testenc::raw_bytes(&v, ScalarType::Float64, false);
        let (h, d) = testenc::binary(&Enc::default(), &raw);
        let t = STANDARD.encode([h, d].concat());
        let wrapped: Vec<String> = t
            .as_bytes()
            .chunks(76)
            .map(|c| String::from_utf8_lossy(c).into_owned())
            .collect();
        let file = format!("  {}\n", wrapped.join("\n")).into_bytes();
        let mut out = vec![99.0];
        decode(
            &file,
            &Payload::Inline(0..file.len()),
            layout(&Enc::default()),
            &Request {
                ty: ScalarType::Float64,
                total: 40,
                elems: 0..40,
            },
            Ctx {
                path: Path::new("t.vtu"),
                what: "array 'a'",
            },
            &mut Vec::new(),
            &mut F64Sink(&mut out),
        )
        .unwrap();
        assert_eq!(out[0], 99.0);
        assert_eq!(out[1..], v);
    }

    #[test]
    fn ascii_bad_token() {
        let file = b"1 2 x3".to_vec();
        let mut out = Vec::new();
        let e = decode(
            &file,
            &Payload::Ascii(0..file.len()),
            layout(&Enc::default()),
            &Request {
                ty: ScalarType::Float64,
                total: 3,
                elems: 0..3,
            },
            Ctx {
                path: Path::new("t.vtu"),
                what: "array 'a'",
            },
            &mut Vec::new(),
            &mut F64Sink(&mut out),
        )
        .unwrap_err()
        .to_string();
        assert!(e.contains("'x3'") && e.contains("value 2"), "{e}");
    }
}
