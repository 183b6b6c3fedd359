//! Digests (SHA-1, SHA-256) computed on a background thread.
//!
//! Hashing a large input on the thread that also tokenizes the XML would make that thread the
//! bottleneck of the pipeline. [`BackgroundDigest`] takes the bytes in chunks and hashes them
//! on a thread of its own; [`BackgroundDigest::finish`] returns the hex digest.

use std::sync::mpsc::{Receiver, SyncSender, sync_channel};
use std::thread::JoinHandle;

use sha1::Digest;

/// Bytes gathered before a chunk is handed to the hashing thread.
const CHUNK: usize = 1 << 20;
/// Chunks queued at most (bounds the memory to a few MiB).
const QUEUE: usize = 4;

/// A digest fed on one thread and computed on another.
pub struct BackgroundDigest {
    pending: Vec<u8>,
    to_worker: Option<SyncSender<Vec<u8>>>,
    recycled: Receiver<Vec<u8>>,
    worker: Option<JoinHandle<String>>,
}

impl BackgroundDigest {
    /// Starts a hashing thread for digest `D` (e.g. `sha1::Sha1`, `sha2::Sha256`).
    pub fn new<D: Digest + Send + 'static>() -> Self {
        let (tx, rx) = sync_channel::<Vec<u8>>(QUEUE);
        let (back_tx, back_rx) = sync_channel::<Vec<u8>>(QUEUE + 2);
        let worker = std::thread::Builder::new()
            .name("mzsift-hash".into())
            .spawn(move || {
                let mut d = D::new();
                for mut chunk in rx {
                    d.update(&chunk);
                    chunk.clear();
                    let _ = back_tx.try_send(chunk);
                }
                d.finalize().iter().map(|b| format!("{b:02x}")).collect()
            })
            .expect("spawn hashing thread");
        BackgroundDigest {
            pending: Vec::with_capacity(CHUNK),
            to_worker: Some(tx),
            recycled: back_rx,
            worker: Some(worker),
        }
    }

    /// Adds bytes to the digest.
    pub fn update(&mut self, mut bytes: &[u8]) {
        while !bytes.is_empty() {
            let room = CHUNK - self.pending.len();
            let n = room.min(bytes.len());
            self.pending.extend_from_slice(&bytes[..n]);
            bytes = &bytes[n..];
            if self.pending.len() == CHUNK {
                self.ship();
            }
        }
    }

    fn ship(&mut self) {
        let next = self.recycled.try_recv().unwrap_or_else(|_| Vec::with_capacity(CHUNK));
        let full = std::mem::replace(&mut self.pending, next);
        if let Some(tx) = &self.to_worker {
            // The worker only stops when the sender is dropped.
            let _ = tx.send(full);
        }
    }

    /// Waits for the hashing thread and returns the lower-case hex digest.
    pub fn finish(mut self) -> String {
        self.finish_mut()
    }

    fn finish_mut(&mut self) -> String {
        if !self.pending.is_empty() {
            self.ship();
        }
        self.to_worker = None;
        self.worker.take().map(|w| w.join().expect("hashing thread panicked")).unwrap_or_default()
    }
}

impl Drop for BackgroundDigest {
    fn drop(&mut self) {
        if self.worker.is_some() {
            let _ = self.finish_mut();
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn matches_known_digests() {
        // FIPS 180-2 appendix examples: SHA-1("abc") and SHA-256("abc").
        let mut a = BackgroundDigest::new::<sha1::Sha1>();
        a.update(b"ab");
        a.update(b"c");
        assert_eq!(a.finish(), "a9993e364706816aba3e25717850c26c9cd0d89d");
        let mut b = BackgroundDigest::new::<sha2::Sha256>();
        b.update(b"abc");
        assert_eq!(b.finish(), "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad");
    }

    #[test]
    fn long_inputs_cross_chunk_boundaries() {
        let data: Vec<u8> = (0..(3 * CHUNK + 123)).map(|i| (i % 251) as u8).collect();
        let mut bg = BackgroundDigest::new::<sha2::Sha256>();
        for piece in data.chunks(70_001) {
            bg.update(piece);
        }
        let direct: String =
            sha2::Sha256::digest(&data).iter().map(|b| format!("{b:02x}")).collect();
        assert_eq!(bg.finish(), direct);
    }
}
