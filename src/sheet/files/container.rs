//! The zip container of both formats (ISO/IEC 21320-1 profile of zip: stored or
//! deflated parts), through the `zip` crate with deflate only. Reading is bounded:
//! the whole file at most [`MAX_FILE_BYTES`], at most [`MAX_PARTS`] parts, each
//! part at most [`MAX_PART_BYTES`] once unpacked, counted while inflating, so a zip
//! bomb (a small archive that unpacks to gigabytes) stops at the limit whatever its
//! headers claim.

use super::model::{FileError, FileErrorKind, MAX_FILE_BYTES, MAX_PARTS, MAX_PART_BYTES};
use alloc::format;
use alloc::string::String;
use alloc::vec::Vec;
use std::io::{Cursor, Read, Write};
use zip::write::SimpleFileOptions;
use zip::{CompressionMethod, ZipArchive, ZipWriter};

/// Builds an archive part by part.
pub(crate) struct ArchiveWriter {
    zip: ZipWriter<Cursor<Vec<u8>>>,
}

fn archive_error(e: impl core::fmt::Display) -> FileError {
    FileError::new(FileErrorKind::Archive, format!("the zip archive: {e}"))
}

impl ArchiveWriter {
    pub(crate) fn new() -> ArchiveWriter {
        ArchiveWriter {
            zip: ZipWriter::new(Cursor::new(Vec::new())),
        }
    }

    /// Add a part; `stored` keeps it uncompressed (the ODF `mimetype` part must be).
    pub(crate) fn part(&mut self, name: &str, bytes: &[u8], stored: bool) {
        let method = if stored {
            CompressionMethod::Stored
        } else {
            CompressionMethod::Deflated
        };
        let options = SimpleFileOptions::default().compression_method(method);
        // Writing into a Vec cannot fail but for an archive over 4 GiB, which the
        // cell limits rule out; a failure would surface at `finish`.
        if self.zip.start_file(name, options).is_ok() {
            let _ = self.zip.write_all(bytes);
        }
    }

    /// The finished archive.
    pub(crate) fn finish(self) -> Result<Vec<u8>, FileError> {
        self.zip
            .finish()
            .map(Cursor::into_inner)
            .map_err(archive_error)
    }
}

/// An archive opened for reading.
pub(crate) struct ArchiveReader<'a> {
    zip: ZipArchive<Cursor<&'a [u8]>>,
}

impl<'a> ArchiveReader<'a> {
    /// Open `bytes` as a zip archive.
    ///
    /// # Errors
    /// [`FileErrorKind::TooLarge`] over [`MAX_FILE_BYTES`] or [`MAX_PARTS`];
    /// [`FileErrorKind::Archive`] when it is no zip archive or a truncated one.
    pub(crate) fn open(bytes: &'a [u8]) -> Result<ArchiveReader<'a>, FileError> {
        if bytes.len() > MAX_FILE_BYTES {
            return Err(FileError::new(
                FileErrorKind::TooLarge,
                format!("the file is larger than {MAX_FILE_BYTES} bytes"),
            ));
        }
        let zip = ZipArchive::new(Cursor::new(bytes)).map_err(|e| {
            FileError::new(
                FileErrorKind::Archive,
                format!("not a readable zip archive (truncated or damaged?): {e}"),
            )
        })?;
        if zip.len() > MAX_PARTS {
            return Err(FileError::new(
                FileErrorKind::TooLarge,
                format!("the archive has more than {MAX_PARTS} parts"),
            ));
        }
        Ok(ArchiveReader { zip })
    }

    /// Whether the archive has a part called `name`.
    pub(crate) fn has(&self, name: &str) -> bool {
        self.zip.index_for_name(name).is_some()
    }

    /// The part `name`, unpacked and checked.
    ///
    /// # Errors
    /// [`FileErrorKind::MissingPart`], [`FileErrorKind::TooLarge`] past
    /// [`MAX_PART_BYTES`] unpacked, [`FileErrorKind::Archive`] on a damaged part.
    pub(crate) fn bytes(&mut self, name: &str) -> Result<Vec<u8>, FileError> {
        let mut part = self.zip.by_name(name).map_err(|_| {
            FileError::new(
                FileErrorKind::MissingPart,
                format!("the part {name} is missing"),
            )
        })?;
        let too_large = || {
            FileError::new(
                FileErrorKind::TooLarge,
                format!("the part {name} unpacks to more than {MAX_PART_BYTES} bytes"),
            )
        };
        if part.size() > MAX_PART_BYTES {
            return Err(too_large());
        }
        let mut out = Vec::new();
        (&mut part)
            .take(MAX_PART_BYTES + 1)
            .read_to_end(&mut out)
            .map_err(|e| {
                FileError::new(
                    FileErrorKind::Archive,
                    format!("the part {name} cannot be unpacked: {e}"),
                )
            })?;
        if out.len() as u64 > MAX_PART_BYTES {
            return Err(too_large());
        }
        Ok(out)
    }

    /// The part `name` as UTF-8 text.
    ///
    /// # Errors
    /// As [`ArchiveReader::bytes`], and [`FileErrorKind::Malformed`] when it is not UTF-8.
    pub(crate) fn text(&mut self, name: &str) -> Result<String, FileError> {
        String::from_utf8(self.bytes(name)?).map_err(|_| {
            FileError::new(
                FileErrorKind::Malformed,
                format!("the part {name} is not UTF-8 text"),
            )
        })
    }
}
