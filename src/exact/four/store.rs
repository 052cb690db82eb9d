//! The 4-line table on disk: a checksummed file of the sorted entries, read and written at a path the caller gives.

use super::perm::*;
use super::table::Compact;
use super::{BuildProgress, Exact4, Level, MAX_DEPTH};
use std::io::{BufReader, BufWriter, Read, Write};
use std::path::Path;

pub(super) const MAGIC: &[u8; 24] = b"oraculum exact4 table v2";

/// A running checksum over 64-bit words.
pub(super) struct Checksum(u64);

impl Checksum {
    pub(super) fn add(&mut self, word: u64) {
        self.0 = (self.0 ^ word)
            .wrapping_mul(0x0000_0100_0000_01b3)
            .rotate_left(29);
    }
}

impl Exact4 {
    /// The file name of the table of `depth` in a store folder (the format's
    /// version is part of it).
    pub fn file_name(depth: u8) -> String {
        format!("exact4-depth{depth}-v2.bin")
    }

    /// Loads the table of `depth` from `path`, or builds it and writes it
    /// there when the file is missing, corrupt or stale. Returns the table and
    /// whether it was built.
    pub fn load_or_build(
        path: &Path,
        depth: u8,
        progress: &(dyn Fn(BuildProgress) + Sync),
    ) -> (Self, bool) {
        if let Some(t) = Self::load(path).filter(|t| t.depth == depth) {
            return (t, false);
        }
        let t = Self::build(depth, progress);
        let _ = t.save(path);
        (t, true)
    }

    /// Reads a cached table; `None` when the file is missing, of another
    /// version, truncated or fails its checksum.
    pub fn load(path: &Path) -> Option<Self> {
        let file = std::fs::File::open(path).ok()?;
        let mut r = BufReader::with_capacity(1 << 22, file);
        let mut magic = [0u8; 24];
        r.read_exact(&mut magic).ok()?;
        if &magic != MAGIC {
            return None;
        }
        let mut sum = Checksum(0);
        let mut word = || -> Option<u64> {
            let mut b = [0u8; 8];
            r.read_exact(&mut b).ok()?;
            Some(u64::from_le_bytes(b))
        };
        let depth = word()?;
        if depth == 0 || depth > MAX_DEPTH as u64 {
            return None;
        }
        sum.add(depth);
        let mut levels = Vec::new();
        for _ in 0..=depth {
            let classes = word()?;
            let functions = word()?;
            sum.add(classes);
            sum.add(functions);
            levels.push(Level { classes, functions });
        }
        let count = levels
            .iter()
            .try_fold(0u64, |a, l| a.checked_add(l.classes))?;
        // Magic, depth, levels, entries, checksum: a damaged count must not
        // ask for more memory than the file holds.
        let expected = count
            .checked_mul(8)?
            .checked_add(24 + 8 + 16 * (depth + 1) + 8)?;
        if count >= u32::MAX as u64 || std::fs::metadata(path).ok()?.len() != expected {
            return None;
        }
        let mut entries = Vec::with_capacity(count as usize);
        let mut seen = vec![0u64; depth as usize + 1];
        for _ in 0..count {
            let e = word()?;
            sum.add(e);
            let d = (e >> 60) as usize;
            if d > depth as usize || e & LOW60 == 0 {
                return None;
            }
            seen[d] += 1;
            entries.push(e);
        }
        if word()? != sum.0 || seen.iter().zip(&levels).any(|(s, l)| *s != l.classes) {
            return None;
        }
        let table = Compact::new(entries)?;
        let depth = depth as u8;
        let counts: Vec<u64> = levels[..depth as usize].iter().map(|l| l.classes).collect();
        let reps = table.levels(&counts);
        Some(Exact4 {
            depth,
            gates: library(),
            table,
            levels,
            reps,
        })
    }

    /// Writes the table to `path` (through a temporary file and a rename).
    pub fn save(&self, path: &Path) -> std::io::Result<()> {
        if let Some(dir) = path.parent() {
            std::fs::create_dir_all(dir)?;
        }
        let tmp = path.with_extension(format!("tmp-{}", std::process::id()));
        let write = || -> std::io::Result<()> {
            let mut w = BufWriter::with_capacity(1 << 22, std::fs::File::create(&tmp)?);
            let mut sum = Checksum(0);
            w.write_all(MAGIC)?;
            let mut put = |w: &mut BufWriter<std::fs::File>, x: u64| {
                sum.add(x);
                w.write_all(&x.to_le_bytes())
            };
            put(&mut w, self.depth as u64)?;
            for l in &self.levels {
                put(&mut w, l.classes)?;
                put(&mut w, l.functions)?;
            }
            for &e in &self.table.entries {
                put(&mut w, e)?;
            }
            let total = sum.0;
            w.write_all(&total.to_le_bytes())?;
            w.into_inner().map_err(|e| e.into_error())?.sync_all()
        };
        match write() {
            Ok(()) => std::fs::rename(&tmp, path),
            Err(e) => {
                let _ = std::fs::remove_file(&tmp);
                Err(e)
            }
        }
    }
}
