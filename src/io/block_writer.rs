//! The file writer behind [`super::write_atomically`]: gathers output in large aligned blocks
//! and, once a file proves big, writes those blocks straight to the disk, past the operating
//! system's file cache.
//!
//! # Why
//! A plan of a million-element model writes over a gigabyte of text and binary data. Through
//! the file cache, the kernel copies every byte into freshly allocated cache pages; on the
//! virtual machines big models are often run on, that copy dominated the plan: `perf` put 27 %
//! of all samples of `hone plan` on a 1M tet10 model in the kernel's page-cache copy, and
//! `dd` wrote 1.2 GB through the cache in 1.4-5.7 s against 0.8-0.9 s with direct writes
//! (measured on the project's 2-core benchmark machine). Direct writes also leave the cache to
//! the data the analyst is working with instead of filling it with files nobody reads at once.
//!
//! # How
//! Linux only (`O_DIRECT`); elsewhere, and for files smaller than one block, everything goes
//! through the cache as usual. Direct writes need block-aligned memory, lengths and file
//! offsets (4096 bytes covers every common disk): bytes are gathered in a block of
//! [`BLOCK`] bytes starting at an aligned address, and only full blocks are written directly,
//! so every offset stays aligned. The first full block switches the file to direct mode; if
//! the file system refuses (`tmpfs`, some network file systems) or a write fails with
//! `EINVAL`, the file goes back to the cache for the rest of the bytes. The tail shorter than
//! a block is written through the cache at [`BlockWriter::finish`]. The bytes in the file are
//! the same either way.
//!
//! [`set_cached_writes`] turns direct writes off (the `--cached-writes` flag), for slow
//! spinning disks where the cache is faster.

use std::fs::File;
use std::io::{self, Write};
use std::sync::atomic::{AtomicBool, Ordering};

/// Bytes gathered before a write: large enough that each direct write streams at the disk's
/// full rate, small enough for eight files written side by side (32 MB of blocks).
pub(crate) const BLOCK: usize = 4 << 20;

/// Alignment of memory, lengths and offsets for direct writes: the largest logical block size
/// of common disks (common practice; Linux `open(2)`, "O_DIRECT").
const DIRECT_ALIGN: usize = 4096;

/// Whether big files skip direct writes (see [`set_cached_writes`]).
static CACHED_ONLY: AtomicBool = AtomicBool::new(false);

/// Makes every output go through the operating system's file cache, never straight to the
/// disk. Direct writes (the default for files of at least 4 MB, on Linux) are much
/// faster where the cache copy is slow (virtual machines) and no slower on solid-state disks;
/// on a spinning disk the cache lets the program end before the disk has caught up.
pub fn set_cached_writes(on: bool) {
    CACHED_ONLY.store(on, Ordering::Relaxed);
}

/// How the blocks of one file are written.
#[derive(Clone, Copy, PartialEq, Eq, Debug)]
enum Mode {
    /// No full block yet: direct writes not tried.
    Undecided,
    /// Full blocks go straight to the disk.
    Direct,
    /// Everything goes through the file cache.
    Cached,
}

/// A writer gathering bytes in an aligned block; see the module notes.
pub(crate) struct BlockWriter {
    file: File,
    /// `BLOCK + DIRECT_ALIGN` bytes; the block is `storage[start..start + BLOCK]`.
    storage: Vec<u8>,
    start: usize,
    /// Bytes gathered in the block.
    filled: usize,
    mode: Mode,
    /// Tests: the next direct write fails with `EINVAL`, as on a file system that takes direct
    /// opens but not direct writes.
    #[cfg(test)]
    refuse_next_direct_write: bool,
}

impl BlockWriter {
    /// Wraps a file opened for writing at offset 0.
    pub(crate) fn new(file: File) -> Self {
        let storage = vec![0u8; BLOCK + DIRECT_ALIGN];
        let start = storage
            .as_ptr()
            .align_offset(DIRECT_ALIGN)
            .min(DIRECT_ALIGN);
        let mode = if CACHED_ONLY.load(Ordering::Relaxed) || !cfg!(target_os = "linux") {
            Mode::Cached
        } else {
            Mode::Undecided
        };
        Self {
            file,
            storage,
            start,
            filled: 0,
            mode,
            #[cfg(test)]
            refuse_next_direct_write: false,
        }
    }

    /// True once a block went straight to the disk (for tests).
    #[cfg(test)]
    fn wrote_directly(&self) -> bool {
        self.mode == Mode::Direct
    }

    /// Writes the full block, directly when the file allows it.
    fn write_block(&mut self) -> io::Result<()> {
        if self.mode == Mode::Undecided {
            self.mode = if set_direct(&self.file, true) {
                Mode::Direct
            } else {
                Mode::Cached
            };
        }
        let block = &self.storage[self.start..self.start + self.filled];
        let mut done = 0;
        while done < block.len() {
            #[cfg(test)]
            let attempt = if self.mode == Mode::Direct && self.refuse_next_direct_write {
                self.refuse_next_direct_write = false;
                Err(io::Error::from_raw_os_error(einval()))
            } else {
                self.file.write(&block[done..])
            };
            #[cfg(not(test))]
            let attempt = self.file.write(&block[done..]);
            match attempt {
                Ok(0) => return Err(io::ErrorKind::WriteZero.into()),
                Ok(n) => done += n,
                Err(e) if e.kind() == io::ErrorKind::Interrupted => {}
                Err(e) if self.mode == Mode::Direct && is_invalid_argument(&e) => {
                    // The file system takes direct opens but not these writes: finish cached.
                    if !set_direct(&self.file, false) {
                        return Err(e);
                    }
                    self.mode = Mode::Cached;
                }
                Err(e) => return Err(e),
            }
        }
        self.filled = 0;
        Ok(())
    }

    /// Writes the last partial block through the cache and returns the file, all bytes in it.
    pub(crate) fn finish(mut self) -> io::Result<File> {
        if self.mode == Mode::Direct {
            if !set_direct(&self.file, false) {
                return Err(io::Error::other(
                    "could not switch the file back from direct writes",
                ));
            }
            self.mode = Mode::Cached;
        }
        let tail = &self.storage[self.start..self.start + self.filled];
        self.file.write_all(tail)?;
        self.filled = 0;
        Ok(self.file)
    }
}

impl Write for BlockWriter {
    fn write(&mut self, data: &[u8]) -> io::Result<usize> {
        let n = data.len().min(BLOCK - self.filled);
        let at = self.start + self.filled;
        self.storage[at..at + n].copy_from_slice(&data[..n]);
        self.filled += n;
        if self.filled == BLOCK {
            self.write_block()?;
        }
        Ok(n)
    }

    fn write_all(&mut self, mut data: &[u8]) -> io::Result<()> {
        while !data.is_empty() {
            let n = self.write(data)?;
            data = &data[n..];
        }
        Ok(())
    }

    /// Bytes short of a full block stay gathered: a partial block would break the alignment of
    /// the direct writes after it. Everything reaches the file in [`BlockWriter::finish`],
    /// which [`super::write_atomically`] calls before the file is renamed into place.
    fn flush(&mut self) -> io::Result<()> {
        Ok(())
    }
}

/// `EINVAL`: what Linux returns when a file system cannot take a direct write.
fn is_invalid_argument(e: &io::Error) -> bool {
    #[cfg(target_os = "linux")]
    {
        e.raw_os_error() == Some(libc::EINVAL)
    }
    #[cfg(not(target_os = "linux"))]
    {
        let _ = e;
        false
    }
}

/// The `EINVAL` error number (tests).
#[cfg(test)]
fn einval() -> i32 {
    #[cfg(target_os = "linux")]
    {
        libc::EINVAL
    }
    #[cfg(not(target_os = "linux"))]
    {
        22
    }
}

/// Turns direct writes on or off for `file`; false when the file system refuses.
fn set_direct(file: &File, on: bool) -> bool {
    #[cfg(target_os = "linux")]
    {
        use std::os::fd::AsRawFd;
        let fd = file.as_raw_fd();
        // SAFETY: `fcntl` with F_GETFL / F_SETFL only reads and sets the status flags of a
        // descriptor `file` keeps open for the whole call; no memory is passed.
        unsafe {
            let flags = libc::fcntl(fd, libc::F_GETFL);
            if flags < 0 {
                return false;
            }
            let wanted = if on {
                flags | libc::O_DIRECT
            } else {
                flags & !libc::O_DIRECT
            };
            libc::fcntl(fd, libc::F_SETFL, wanted) == 0
        }
    }
    #[cfg(not(target_os = "linux"))]
    {
        let _ = (file, on);
        false
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use std::io::Read;

    /// Bytes with no period that lines up with the block size.
    fn pattern(n: usize) -> Vec<u8> {
        (0..n).map(|i| (i * 7 + i / 251) as u8).collect()
    }

    /// Writes `data` in pieces of odd sizes and reads the file back.
    fn round_trip(dir: &std::path::Path, data: &[u8]) -> (Vec<u8>, bool) {
        let path = dir.join("out.bin");
        let file = File::create(&path).unwrap();
        let mut w = BlockWriter::new(file);
        let mut rest = data;
        let mut piece = 1;
        while !rest.is_empty() {
            let n = piece.min(rest.len());
            w.write_all(&rest[..n]).unwrap();
            rest = &rest[n..];
            piece = piece * 3 % 1_000_003 + 17;
        }
        let direct = w.wrote_directly();
        drop(w.finish().unwrap());
        let mut back = Vec::new();
        File::open(&path).unwrap().read_to_end(&mut back).unwrap();
        (back, direct)
    }

    /// The file holds exactly the bytes written, whether the blocks went straight to the disk
    /// or through the cache (the temporary directory's file system decides), for sizes below,
    /// at and above whole blocks.
    #[test]
    fn file_holds_every_byte_in_order() {
        let dir = tempfile::tempdir().unwrap();
        for n in [0, 1, 4095, BLOCK - 1, BLOCK, BLOCK + 1, 3 * BLOCK + 12_345] {
            let data = pattern(n);
            let (back, direct) = round_trip(dir.path(), &data);
            assert_eq!(back.len(), n, "length, {n} bytes written");
            assert!(back == data, "content, {n} bytes written");
            if n < BLOCK {
                assert!(!direct, "a file under one block never goes direct");
            }
        }
    }

    /// A direct write refused with `EINVAL` part-way through a file sends the rest through the
    /// cache, and the file still holds every byte in order.
    #[test]
    fn refused_direct_write_falls_back_to_the_cache() {
        let dir = tempfile::tempdir().unwrap();
        let data = pattern(3 * BLOCK + 999);
        let path = dir.path().join("fallback.bin");
        let mut w = BlockWriter::new(File::create(&path).unwrap());
        // The first block decides the mode: direct where the file system takes it.
        w.write_all(&data[..BLOCK]).unwrap();
        let went_direct = w.wrote_directly();
        w.refuse_next_direct_write = true;
        w.write_all(&data[BLOCK..]).unwrap();
        if went_direct {
            assert_eq!(w.mode, Mode::Cached, "an EINVAL ends direct writes");
        }
        drop(w.finish().unwrap());
        assert!(std::fs::read(&path).unwrap() == data);
    }

    /// With cached writes forced, big files are the same and never go direct.
    #[test]
    fn cached_writes_give_the_same_file() {
        let dir = tempfile::tempdir().unwrap();
        let data = pattern(2 * BLOCK + 7);
        let path = dir.path().join("cached.bin");
        let mut w = BlockWriter::new(File::create(&path).unwrap());
        w.mode = Mode::Cached;
        w.write_all(&data).unwrap();
        assert!(!w.wrote_directly());
        drop(w.finish().unwrap());
        assert!(std::fs::read(&path).unwrap() == data);
    }
}
