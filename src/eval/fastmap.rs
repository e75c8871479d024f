//! A small, fast hash for the evaluator's name tables.
//!
//! Names are hashed on every lookup; std's SipHash guards against hostile
//! keys, which a local worksheet is not, and costs several times more. This is
//! the multiply-rotate scheme used by the Rust compiler's own hash maps.

use std::collections::{HashMap, HashSet};
use std::hash::{BuildHasherDefault, Hasher};

/// Multiply-rotate hasher over 8-byte words.
#[derive(Default, Clone, Copy)]
pub struct WordHasher {
    hash: u64,
}

const SEED: u64 = 0x51_7c_c1_b7_27_22_0a_95;

impl WordHasher {
    fn add(&mut self, word: u64) {
        self.hash = (self.hash.rotate_left(5) ^ word).wrapping_mul(SEED);
    }
}

impl Hasher for WordHasher {
    fn write(&mut self, bytes: &[u8]) {
        let mut chunks = bytes.chunks_exact(8);
        for c in &mut chunks {
            let mut w = [0u8; 8];
            w.copy_from_slice(c);
            self.add(u64::from_le_bytes(w));
        }
        let rest = chunks.remainder();
        if !rest.is_empty() {
            // Byte by byte (at most seven): a copy of variable length would
            // call memcpy, which costs more than the hashing for short names.
            let w = rest
                .iter()
                .enumerate()
                .fold(0u64, |w, (i, b)| w | (u64::from(*b) << (8 * i)));
            self.add(w);
        }
    }

    fn write_u8(&mut self, i: u8) {
        self.add(u64::from(i));
    }

    fn write_u32(&mut self, i: u32) {
        self.add(u64::from(i));
    }

    fn write_u64(&mut self, i: u64) {
        self.add(i);
    }

    fn write_usize(&mut self, i: usize) {
        self.add(i as u64);
    }

    fn finish(&self) -> u64 {
        self.hash
    }
}

/// A `HashMap` with [`WordHasher`].
pub type FastMap<K, V> = HashMap<K, V, BuildHasherDefault<WordHasher>>;

/// A `HashSet` with [`WordHasher`] (made without the random keys of std's
/// hasher, which cost more than the set when it stays empty).
pub type FastSet<K> = HashSet<K, BuildHasherDefault<WordHasher>>;

#[cfg(test)]
mod tests {
    use super::FastMap;

    #[test]
    fn behaves_as_a_map() {
        let mut m: FastMap<String, i32> = FastMap::default();
        for i in 0..1000 {
            m.insert(format!("name_{i}"), i);
        }
        assert_eq!(m.len(), 1000);
        assert_eq!(m.get("name_517"), Some(&517));
        assert_eq!(m.get("name_1000"), None);
    }
}
