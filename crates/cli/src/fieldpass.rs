//! Full-field passes: the measures of every point or cell of one increment, into reused
//! buffers, in parallel.
//!
//! One fused kernel ([`ductrace_tensor::batch::measures_of`]) reads the decoded stress
//! array and writes σ_h, σ_vm, η, θ̄ (only with [`Lode::Compute`]) and a "defined" mask per
//! entity, counting non-finite input on the way; no allocation per entity, no intermediate
//! array of states. Two ways to feed it:
//!
//! * decoding ([`FieldState::fetch`]) and evaluation ([`FieldState::evaluate`]) as separate
//!   steps, so a pass can decode the next increment while it evaluates this one (compressed
//!   data, whose blocks are inflated in parallel);
//! * decoding inside the evaluation ([`FieldState::load_direct`]): each parallel chunk reads
//!   its own tuples (uncompressed binary data, whose ranges cost only their own bytes).

use ductrace_tensor::{ComponentOrder, batch};
use ductrace_track::fields::{EqpsSource, Fields};
use ductrace_vtk::{Increment, Location, Series, find_nonfinite};
use rayon::iter::Either;
use rayon::prelude::*;

use crate::failure::Failure;

/// Whether a pass computes the Lode angle parameter θ̄ (one `acos` per entity).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Lode {
    /// Compute θ̄ (export, loci that depend on it).
    Compute,
    /// Leave it out: the pass's locus does not depend on θ̄
    /// ([`ductrace_locus::FractureLocus::uses_lode_angle`]).
    Skip,
}

/// Per-entity measures of one increment. `triaxiality` and `lode_angle_param` hold 0
/// where `defined` is false (never read there); `lode_angle_param` is empty when the pass
/// did not ask for θ̄ (a locus that does not depend on it).
#[derive(Debug, Default)]
pub struct FieldState {
    /// Decoded stress (reused).
    pub stress: Vec<f64>,
    /// Decoded ε̄p (reused).
    pub eqps: Vec<f64>,
    /// σ_h.
    pub sigma_h: Vec<f64>,
    /// σ_vm.
    pub sigma_vm: Vec<f64>,
    /// η where defined.
    pub triaxiality: Vec<f64>,
    /// θ̄ where defined; empty when not asked for.
    pub lode_angle_param: Vec<f64>,
    /// Shape measures defined (σ_vm > 0 and finite input).
    pub defined: Vec<bool>,
}

const CHUNK: usize = batch::CHUNK;

impl FieldState {
    /// Decodes and evaluates one increment: [`FieldState::fetch`] then
    /// [`FieldState::evaluate`]. Non-finite stress or ε̄p values are an error unless
    /// `allow_nonfinite`, in which case those entities are undefined (and their ε̄p is
    /// carried from the previous increment by the caller's kernel, which sees them as
    /// undefined).
    pub fn load(
        &mut self,
        series: &Series,
        inc: &Increment<'_>,
        fields: &Fields,
        allow_nonfinite: bool,
        lode: Lode,
    ) -> Result<(), Failure> {
        self.fetch(series, inc, fields)?;
        self.evaluate(series, inc.index(), fields, allow_nonfinite, lode)
    }

    /// Decodes the stress and ε̄p arrays of one increment into the reused buffers, nothing
    /// else; a pass can fetch increment k + 1 into a second state while it evaluates
    /// increment k.
    pub fn fetch(
        &mut self,
        series: &Series,
        inc: &Increment<'_>,
        fields: &Fields,
    ) -> Result<(), Failure> {
        let loc = fields.location;
        let eqps = self.eqps_name(series, fields)?;
        inc.read(&fields.stress, loc, &mut self.stress)?;
        inc.read(eqps, loc, &mut self.eqps)?;
        Ok(())
    }

    /// Evaluates the fetched arrays of increment `index` in one parallel pass: σ_h, σ_vm,
    /// η, θ̄ (with [`Lode::Compute`]) and the mask per entity ([`batch::measures_of`]),
    /// counting non-finite input on the way; the first non-finite value is located (for the
    /// message) only when there is one and `allow_nonfinite` is off.
    pub fn evaluate(
        &mut self,
        series: &Series,
        index: usize,
        fields: &Fields,
        allow_nonfinite: bool,
        lode: Lode,
    ) -> Result<(), Failure> {
        let width = fields.stress_components;
        let n = self.stress.len() / width;
        if self.eqps.len() != n {
            return Err(Failure::data(format!(
                "{}: stress has {n} tuples but the equivalent plastic strain {}",
                series.path().display(),
                self.eqps.len()
            )));
        }
        self.size_outputs(n);
        let theta_chunks = theta_chunks(&mut self.lode_angle_param, n, lode);
        let order: ComponentOrder = fields.stress_order;
        let stress = &self.stress;
        let (bad_stress, bad_eqps) = self
            .sigma_h
            .par_chunks_mut(CHUNK)
            .zip(self.sigma_vm.par_chunks_mut(CHUNK))
            .zip(self.triaxiality.par_chunks_mut(CHUNK))
            .zip(theta_chunks)
            .zip(self.defined.par_chunks_mut(CHUNK))
            .zip(stress.par_chunks(CHUNK * width))
            .zip(self.eqps.par_chunks(CHUNK))
            .map(|((((((h, vm), eta), theta), def), s), e)| {
                let out = ChunkOut {
                    sigma_h: h,
                    sigma_vm: vm,
                    triaxiality: eta,
                    lode_angle_param: theta,
                    defined: def,
                };
                (evaluate_chunk(s, width, &order, out), count_nonfinite(e))
            })
            .reduce(|| (0, 0), |a, b| (a.0 + b.0, a.1 + b.1));
        self.report_nonfinite(series, index, fields, allow_nonfinite, bad_stress, bad_eqps)
    }

    /// Decodes and evaluates one increment with decoding split across threads: each parallel
    /// chunk of entities reads its own tuples of stress and ε̄p
    /// ([`Increment::read_tuples_using`]) into small per-thread buffers and evaluates them at once, so the stress array is never
    /// copied whole. For data whose ranges cost only their own bytes
    /// ([`Increment::ranges_are_direct`]: uncompressed binary); `stress` is left empty (the
    /// callers of this path do not need it). Same results and errors as
    /// [`FieldState::load`].
    pub fn load_direct(
        &mut self,
        series: &Series,
        inc: &Increment<'_>,
        fields: &Fields,
        allow_nonfinite: bool,
        lode: Lode,
    ) -> Result<(), Failure> {
        let loc = fields.location;
        let width = fields.stress_components;
        let eqps_name = self.eqps_name(series, fields)?;
        let n = match loc {
            Location::Cell => series.n_cells(),
            Location::Point => series.n_points(),
        };
        self.stress.clear();
        self.eqps.resize(n, 0.0);
        self.size_outputs(n);
        let theta_chunks = theta_chunks(&mut self.lode_angle_param, n, lode);
        let order: ComponentOrder = fields.stress_order;
        // Per chunk: Ok((non-finite stress tuples, non-finite ε̄p)) or the chunk's first
        // read error; the lowest chunk's error wins, as a serial read would report it.
        let counts = self
            .sigma_h
            .par_chunks_mut(CHUNK)
            .zip(self.sigma_vm.par_chunks_mut(CHUNK))
            .zip(self.triaxiality.par_chunks_mut(CHUNK))
            .zip(theta_chunks)
            .zip(self.defined.par_chunks_mut(CHUNK))
            .zip(self.eqps.par_chunks_mut(CHUNK))
            .enumerate()
            .map_init(
                || (Vec::new(), Vec::new(), Vec::new()),
                |(sbuf, ebuf, bytes), (c, (((((h, vm), eta), theta), def), e))| {
                    let range = c * CHUNK..c * CHUNK + h.len();
                    let read = inc
                        .read_tuples_using(&fields.stress, loc, range.clone(), sbuf, bytes)
                        .and_then(|_| inc.read_tuples_using(eqps_name, loc, range, ebuf, bytes));
                    if let Err(err) = read {
                        return Err((c, err));
                    }
                    // read_tuples returns exactly the range; checked so a slip cannot panic
                    let (want, got) = if sbuf.len() != h.len() * width {
                        (h.len() * width, sbuf.len())
                    } else {
                        (e.len(), ebuf.len())
                    };
                    if want != got {
                        return Err((
                            c,
                            ductrace_vtk::Error::SizeMismatch {
                                path: series.path().to_path_buf(),
                                what: format!("values of chunk {c}"),
                                expected: want as u64,
                                found: got as u64,
                            },
                        ));
                    }
                    e.copy_from_slice(ebuf);
                    let out = ChunkOut {
                        sigma_h: h,
                        sigma_vm: vm,
                        triaxiality: eta,
                        lode_angle_param: theta,
                        defined: def,
                    };
                    Ok((evaluate_chunk(sbuf, width, &order, out), count_nonfinite(e)))
                },
            )
            .reduce(
                || Ok((0, 0)),
                |a, b| match (a, b) {
                    (Ok(a), Ok(b)) => Ok((a.0 + b.0, a.1 + b.1)),
                    (Err(a), Err(b)) => Err(if a.0 <= b.0 { a } else { b }),
                    (Err(e), Ok(_)) | (Ok(_), Err(e)) => Err(e),
                },
            );
        let (bad_stress, bad_eqps) = counts.map_err(|(_, e)| Failure::from(e))?;
        if bad_stress > 0 && !allow_nonfinite {
            // rare: decode the whole array once more to name the first non-finite value
            inc.read(&fields.stress, loc, &mut self.stress)?;
        }
        self.report_nonfinite(
            series,
            inc.index(),
            fields,
            allow_nonfinite,
            bad_stress,
            bad_eqps,
        )
    }

    /// Sizes the per-entity outputs but θ̄ (see [`theta_chunks`]) for `n` entities.
    fn size_outputs(&mut self, n: usize) {
        self.sigma_h.resize(n, 0.0);
        self.sigma_vm.resize(n, 0.0);
        self.triaxiality.resize(n, 0.0);
        self.defined.resize(n, false);
    }

    /// The name of the scalar ε̄p array, or the error of a result without one.
    fn eqps_name<'f>(&self, series: &Series, fields: &'f Fields) -> Result<&'f str, Failure> {
        match &fields.eqps {
            Some(EqpsSource::Scalar(name)) => Ok(name),
            Some(EqpsSource::Accumulated { name, .. }) => Err(Failure::data(format!(
                "{}: full-field work needs a scalar equivalent plastic strain array; this result has only the plastic strain tensor {name:?} (name a scalar with --eqps)",
                series.path().display()
            ))),
            None => Err(Failure::data(format!(
                "{}: no equivalent plastic strain array (name one with --eqps)",
                series.path().display()
            ))),
        }
    }

    /// The error for non-finite stress or ε̄p values (unless allowed), locating the first one.
    fn report_nonfinite(
        &self,
        series: &Series,
        index: usize,
        fields: &Fields,
        allow_nonfinite: bool,
        bad_stress: usize,
        bad_eqps: usize,
    ) -> Result<(), Failure> {
        let loc = fields.location;
        let width = fields.stress_components;
        if bad_stress > 0
            && !allow_nonfinite
            && let Some(nf) = find_nonfinite(&self.stress, width)
        {
            return Err(Failure::data(format!(
                "{}: stress {:?} at increment {index} has {} non-finite values (first at {loc} {}); --allow-nonfinite skips them",
                series.path().display(),
                fields.stress,
                nf.count,
                nf.first_tuple
            )));
        }
        if bad_eqps > 0
            && !allow_nonfinite
            && let Some(nf) = find_nonfinite(&self.eqps, 1)
        {
            let name = match &fields.eqps {
                Some(EqpsSource::Scalar(name)) => name.as_str(),
                _ => "",
            };
            return Err(Failure::data(format!(
                "{}: equivalent plastic strain {name:?} at increment {index} has {} non-finite values (first at {loc} {}); --allow-nonfinite skips them",
                series.path().display(),
                nf.count,
                nf.first_tuple
            )));
        }
        Ok(())
    }
}

/// The θ̄ output of each chunk of `n` entities: `buf` sized and split with
/// [`Lode::Compute`], emptied and `None` per chunk with [`Lode::Skip`].
fn theta_chunks(
    buf: &mut Vec<f64>,
    n: usize,
    lode: Lode,
) -> impl IndexedParallelIterator<Item = Option<&mut [f64]>> {
    match lode {
        Lode::Compute => {
            buf.resize(n, 0.0);
            Either::Left(buf.par_chunks_mut(CHUNK).map(Some))
        }
        Lode::Skip => {
            buf.clear();
            Either::Right((0..n.div_ceil(CHUNK)).into_par_iter().map(|_| None))
        }
    }
}

/// The output slices of one chunk of entities.
struct ChunkOut<'a> {
    sigma_h: &'a mut [f64],
    sigma_vm: &'a mut [f64],
    triaxiality: &'a mut [f64],
    lode_angle_param: Option<&'a mut [f64]>,
    defined: &'a mut [bool],
}

/// The measures of one chunk of stress tuples (`width` components each) into `out`;
/// returns the number of tuples with a non-finite component (σ_h and σ_vm NaN there, the
/// mask false).
fn evaluate_chunk(
    stress: &[f64],
    width: usize,
    order: &ComponentOrder,
    out: ChunkOut<'_>,
) -> usize {
    let ChunkOut {
        sigma_h: h,
        sigma_vm: vm,
        triaxiality: eta,
        lode_angle_param: mut theta,
        defined: def,
    } = out;
    let mut bad = 0usize;
    for (i, t) in stress.chunks_exact(width).enumerate() {
        let (theta_i, ok) = match batch::measures_of(t, order) {
            Ok(m) => {
                h[i] = m.sigma_h;
                vm[i] = m.sigma_vm;
                match m.shape {
                    Some(l) => {
                        eta[i] = l.triaxiality;
                        // θ̄ (one acos) only when asked for
                        let th = if theta.is_some() {
                            l.lode_angle_param()
                        } else {
                            0.0
                        };
                        (th, true)
                    }
                    None => {
                        eta[i] = 0.0;
                        (0.0, false)
                    }
                }
            }
            Err(_) => {
                bad += 1;
                h[i] = f64::NAN;
                vm[i] = f64::NAN;
                eta[i] = 0.0;
                (0.0, false)
            }
        };
        def[i] = ok;
        if let Some(th) = theta.as_deref_mut() {
            th[i] = theta_i;
        }
    }
    bad
}

fn count_nonfinite(values: &[f64]) -> usize {
    values.iter().filter(|v| !v.is_finite()).count()
}

#[cfg(test)]
mod tests {
    #![allow(clippy::unwrap_used)]
    use super::*;
    use ductrace_track::FieldOptions;
    use ductrace_vtk::write::{ArrayRef, CellsRef, write_vtu};

    /// A one-file series of `n` vertex cells (appended raw, so its ranges are direct) with
    /// cell arrays `stress` and `eqps`; some cells unloaded (zero stress), some hydrostatic.
    fn series(dir: &std::path::Path, n: usize, poison: Option<usize>) -> std::path::PathBuf {
        let points: Vec<[f64; 3]> = (0..n).map(|i| [i as f64, 0.0, 0.0]).collect();
        let connectivity: Vec<usize> = (0..n).collect();
        let offsets: Vec<usize> = (0..=n).collect();
        let types = vec![1u8; n];
        let mut stress = Vec::with_capacity(6 * n);
        let mut eqps = Vec::with_capacity(n);
        for i in 0..n {
            let x = i as f64;
            let t = match i % 97 {
                0 => [0.0; 6],
                1 => [5.0, 5.0, 5.0, 0.0, 0.0, 0.0],
                _ => [
                    100.0 + x.sin() * 50.0,
                    x.cos() * 30.0,
                    -20.0 + (0.3 * x).sin(),
                    (0.7 * x).cos() * 10.0,
                    5.0,
                    -3.0 + 0.001 * x,
                ],
            };
            stress.extend_from_slice(&t);
            eqps.push(0.001 * (i % 13) as f64);
        }
        if let Some(p) = poison {
            stress[6 * p + 4] = f64::NAN;
            eqps[p + 1] = f64::INFINITY;
        }
        let path = dir.join("direct.vtu");
        let cells = CellsRef {
            connectivity: &connectivity,
            offsets: &offsets,
            types: &types,
        };
        let cd = [
            ArrayRef {
                name: "stress",
                components: 6,
                data: &stress,
            },
            ArrayRef {
                name: "eqps",
                components: 1,
                data: &eqps,
            },
        ];
        write_vtu(&path, &points, &cells, &[], &cd).unwrap();
        path
    }

    fn bits(v: &[f64]) -> Vec<u64> {
        v.iter().map(|x| x.to_bits()).collect()
    }

    /// Asserts that both decoding paths give the same bits (θ̄ computed).
    fn assert_same_state(path: &std::path::Path) -> usize {
        let s = Series::open(path).unwrap();
        let fields =
            ductrace_track::fields::resolve(&s, &FieldOptions::default(), true, false).unwrap();
        let inc = s.increment(0).unwrap();
        let mut whole = FieldState::default();
        let mut direct = FieldState::default();
        whole.load(&s, &inc, &fields, false, Lode::Compute).unwrap();
        direct
            .load_direct(&s, &inc, &fields, false, Lode::Compute)
            .unwrap();
        assert_eq!(bits(&whole.sigma_h), bits(&direct.sigma_h));
        assert_eq!(bits(&whole.sigma_vm), bits(&direct.sigma_vm));
        assert_eq!(bits(&whole.triaxiality), bits(&direct.triaxiality));
        assert_eq!(
            bits(&whole.lode_angle_param),
            bits(&direct.lode_angle_param)
        );
        assert_eq!(whole.defined, direct.defined);
        assert_eq!(bits(&whole.eqps), bits(&direct.eqps));
        whole.eqps.len()
    }

    #[test]
    fn direct_decoding_across_pieces_and_encodings() {
        // Three pieces whose boundaries fall inside chunks of CHUNK cells, in each
        // uncompressed binary encoding (direct) and, for contrast, compressed and ascii ones.
        use ductrace_vtk::testenc::{self, Arr, Comp, Enc, Format, Piece};
        let dir = tempfile::tempdir().unwrap();
        let sizes = [3000usize, 2500, 3100];
        let pieces: Vec<Piece> = sizes
            .iter()
            .enumerate()
            .map(|(k, &n)| {
                let mut p = Piece::hex_row(n, (k * 10_000) as f64);
                let stress: Vec<f64> = (0..6 * n)
                    .map(|i| ((i * 7919 + k * 31) % 1000) as f64 - 400.0)
                    .collect();
                p.cell_data.push(Arr::f64("stress", 6, stress));
                p.cell_data.push(Arr::f64(
                    "eqps",
                    1,
                    (0..n).map(|i| 1e-4 * i as f64).collect(),
                ));
                p
            })
            .collect();
        let cases = [
            (Format::AppendedRaw, Comp::None, true),
            (Format::AppendedBase64, Comp::None, true),
            (Format::InlineOneRun, Comp::None, true),
            (Format::AppendedRaw, Comp::Zlib, false),
            (Format::Ascii, Comp::None, false),
        ];
        for (i, (format, comp, direct)) in cases.into_iter().enumerate() {
            let enc = Enc {
                format,
                comp,
                ..Enc::default()
            };
            let path = dir.path().join(format!("p{i}.vtu"));
            std::fs::write(&path, testenc::vtu(&enc, &pieces, None)).unwrap();
            let s = Series::open(&path).unwrap();
            let inc = s.increment(0).unwrap();
            assert_eq!(
                inc.ranges_are_direct("stress", Location::Cell).unwrap(),
                direct,
                "{format:?} {comp:?}"
            );
            assert_eq!(assert_same_state(&path), sizes.iter().sum::<usize>());
        }
    }

    #[test]
    fn direct_decoding_gives_the_same_state_and_errors_as_decoding_whole_arrays() {
        // Several chunks (CHUNK entities each) and a short last one.
        let n = 3 * CHUNK + 123;
        let dir = tempfile::tempdir().unwrap();
        for poison in [None, Some(2 * CHUNK + 7)] {
            let path = series(dir.path(), n, poison);
            let s = Series::open(&path).unwrap();
            let mut opts = FieldOptions::default();
            for allow in [false, true] {
                opts.allow_nonfinite = allow;
                let fields = ductrace_track::fields::resolve(&s, &opts, true, false).unwrap();
                let inc = s.increment(0).unwrap();
                assert!(inc.ranges_are_direct("stress", Location::Cell).unwrap());
                for lode in [Lode::Compute, Lode::Skip] {
                    let mut whole = FieldState::default();
                    let mut direct = FieldState::default();
                    let a = whole.load(&s, &inc, &fields, allow, lode);
                    let b = direct.load_direct(&s, &inc, &fields, allow, lode);
                    match (a, b) {
                        (Ok(()), Ok(())) => {
                            assert!(poison.is_none() || allow);
                            assert_eq!(bits(&whole.sigma_h), bits(&direct.sigma_h));
                            assert_eq!(bits(&whole.sigma_vm), bits(&direct.sigma_vm));
                            assert_eq!(bits(&whole.triaxiality), bits(&direct.triaxiality));
                            assert_eq!(
                                bits(&whole.lode_angle_param),
                                bits(&direct.lode_angle_param)
                            );
                            assert_eq!(whole.defined, direct.defined);
                            assert_eq!(bits(&whole.eqps), bits(&direct.eqps));
                            assert_eq!(whole.defined.len(), n);
                            assert!(!whole.defined[0] && !whole.defined[1] && whole.defined[2]);
                            assert_eq!(
                                direct.lode_angle_param.len(),
                                if lode == Lode::Compute { n } else { 0 }
                            );
                        }
                        (Err(a), Err(b)) => {
                            assert!(poison.is_some() && !allow);
                            assert_eq!(a.to_string(), b.to_string());
                            let want = format!("first at cell {}", 2 * CHUNK + 7);
                            assert!(a.to_string().contains(&want), "{a}");
                        }
                        (a, b) => panic!("{a:?} vs {b:?}"),
                    }
                }
            }
        }
    }
}
