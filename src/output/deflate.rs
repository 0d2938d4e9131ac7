//! A zlib stream (RFC 1950) written as pieces that several cores compress apart: PNG's image
//! data, band by band, each band compressed by the core that drew it.
//!
//! Each piece is one deflate block with the fixed Huffman codes (RFC 1951, 3.2.6), ended by
//! an empty stored block. That ending, what zlib calls a sync flush, leaves the stream on a
//! byte boundary, so pieces made apart join end to end into one valid stream; their Adler-32
//! checksums combine by a closed formula ([`Adler32::then`]). The stream is
//! [`ZLIB_HEADER`], the pieces in order, [`FINAL_EMPTY_BLOCK`] and the combined checksum.
//!
//! Tuned for filtered line art, which is mostly zero bytes: a run of zeros becomes one
//! literal zero and copies of the byte before it (distance 1, up to 258 bytes a copy), and
//! [`Piece::differences`] takes the bytes PNG's filters make (one row less another) eight at
//! a time, skipping equal words without looking at their bytes. Measured on the
//! benchmark's town at 8192x4096 (`benches/README.md`).

/// A zlib header: deflate with a 32 KB window (CMF 0x78), the fastest level, and the check
/// bits making the pair a multiple of 31 (RFC 1950, 2.2: 0x7801 = 31 x 991).
pub const ZLIB_HEADER: [u8; 2] = [0x78, 0x01];

/// The last block of a stream: final, fixed codes, nothing but the end-of-block code
/// (bits 1, 01, then seven zeros, least significant first).
pub const FINAL_EMPTY_BLOCK: [u8; 2] = [0x03, 0x00];

/// Adler-32's modulus, the largest prime below 2^16 (RFC 1950, 8.2).
const ADLER_MOD: u64 = 65521;

/// The Adler-32 checksum of a run of bytes (RFC 1950, 8.2): `a` is one plus the sum of the
/// bytes, `b` the sum of the `a` after each byte, both modulo 65521.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct Adler32 {
    a: u64,
    b: u64,
    /// Bytes summed.
    len: u64,
}

impl Default for Adler32 {
    fn default() -> Self {
        Adler32 { a: 1, b: 0, len: 0 }
    }
}

impl Adler32 {
    /// The checksum as zlib stores it, `b` in the high half.
    pub fn value(&self) -> u32 {
        ((self.b % ADLER_MOD) << 16 | (self.a % ADLER_MOD)) as u32
    }

    /// The checksum of this run followed by `next`: `a = a1 + a2 - 1` and
    /// `b = b1 + b2 + n2 (a1 - 1)`, n2 being `next`'s length (worked from the definition:
    /// every `a` after a byte of `next` is its own plus the first run's bytes' sum; zlib's
    /// `adler32_combine` computes the same).
    pub fn then(&self, next: &Adler32) -> Adler32 {
        let (a1, b1) = (self.a % ADLER_MOD, self.b % ADLER_MOD);
        let (a2, b2) = (next.a % ADLER_MOD, next.b % ADLER_MOD);
        let n2 = next.len % ADLER_MOD;
        Adler32 {
            a: (a1 + a2 + ADLER_MOD - 1) % ADLER_MOD,
            b: (b1 + b2 + n2 * ((a1 + ADLER_MOD - 1) % ADLER_MOD)) % ADLER_MOD,
            len: self.len + next.len,
        }
    }

    fn reduce(&mut self) {
        self.a %= ADLER_MOD;
        self.b %= ADLER_MOD;
    }
}

/// `(code, bits)` of each literal/length symbol 0..=287 in the fixed Huffman code
/// (RFC 1951, 3.2.6), the code's bits reversed so that it is written least significant bit
/// first like every other field (RFC 1951, 3.1.1).
const FIXED_CODES: [(u32, u32); 288] = {
    let mut codes = [(0, 0); 288];
    let mut symbol = 0;
    while symbol < 288 {
        let (first_code, first_symbol, bits) = match symbol {
            0..=143 => (0x30, 0, 8),
            144..=255 => (0x190, 144, 9),
            256..=279 => (0x00, 256, 7),
            _ => (0xC0, 280, 8),
        };
        codes[symbol] = (
            reversed(first_code + (symbol - first_symbol) as u32, bits),
            bits,
        );
        symbol += 1;
    }
    codes
};

/// The `bits` low bits of `code` in reverse order.
const fn reversed(code: u32, bits: u32) -> u32 {
    code.reverse_bits() >> (32 - bits)
}

/// The shortest copy a match may make, and the longest (RFC 1951, 3.2.5).
const MIN_MATCH: usize = 3;
const MAX_MATCH: usize = 258;

/// `(bits, count)` of a copy of each length 3..=258 from one byte back: the length's symbol
/// (257..=285, fixed code), its extra bits, and distance code 0 (five zero bits), written as
/// one field. Lengths from RFC 1951, 3.2.5: each symbol covers `base .. base + 2^extra`, and
/// 258 has a symbol of its own (285).
const COPIES: [(u32, u32); MAX_MATCH + 1] = {
    const BASE: [usize; 29] = [
        3, 4, 5, 6, 7, 8, 9, 10, 11, 13, 15, 17, 19, 23, 27, 31, 35, 43, 51, 59, 67, 83, 99, 115,
        131, 163, 195, 227, 258,
    ];
    const EXTRA: [u32; 29] = [
        0, 0, 0, 0, 0, 0, 0, 0, 1, 1, 1, 1, 2, 2, 2, 2, 3, 3, 3, 3, 4, 4, 4, 4, 5, 5, 5, 5, 0,
    ];
    let mut copies = [(0, 0); MAX_MATCH + 1];
    let mut length = MIN_MATCH;
    while length <= MAX_MATCH {
        let mut index = 28;
        while BASE[index] > length {
            index -= 1;
        }
        let (code, bits) = FIXED_CODES[257 + index];
        let extra = (length - BASE[index]) as u32;
        // Distance code 0 (distance 1) is five zero bits: nothing to add but its count.
        copies[length] = (code | extra << bits, bits + EXTRA[index] + 5);
        length += 1;
    }
    copies
};

/// One piece of a stream: bytes that join end to end with the pieces around them, and the
/// checksum of the data they hold. Feed it with [`Piece::byte`] and
/// [`Piece::differences`], then [`Piece::finish`].
pub struct Piece {
    out: Vec<u8>,
    coder: Coder,
}

/// The coding state of a piece, apart from its bytes.
#[derive(Clone, Copy)]
struct Coder {
    /// Bits not yet in whole bytes, least significant first, and how many (fewer than 8
    /// between writes).
    bits: u64,
    count: u32,
    /// Where the next byte goes in the piece's bytes: the bytes after it are room for the
    /// next write (eight bytes are stored at a time, whatever the bits, so that a write
    /// never branches on how full the buffer is).
    at: usize,
    /// Zero bytes given but not yet coded.
    zeros: usize,
    /// Whether the byte before the pending zeros, in this piece, is a zero: a run may then
    /// begin with a copy instead of a literal.
    after_zero: bool,
    adler: Adler32,
    /// Bytes summed into `adler.a` since it was last reduced.
    unreduced: u32,
}

impl Piece {
    /// A piece writing into `out` (its bytes are overwritten; its capacity is used).
    pub fn new(mut out: Vec<u8>) -> Piece {
        out.clear();
        out.resize(out.capacity().max(64), 0);
        let mut coder = Coder {
            bits: 0,
            count: 0,
            at: 0,
            zeros: 0,
            after_zero: false,
            adler: Adler32::default(),
            unreduced: 0,
        };
        // Block header: not the last block (0), fixed codes (01).
        coder.write(&mut out, 0b010, 3);
        Piece { out, coder }
    }

    /// One byte of data.
    pub fn byte(&mut self, value: u8) {
        match value {
            0 => self.coder.zeros += 1,
            _ => self.coder.literal(&mut self.out, value),
        }
    }

    /// The bytes `now[i] - before[i]` (wrapping), as PNG's filters make them: eight at a
    /// time, all zeros where the words are equal (in a wireframe, almost everywhere),
    /// otherwise zeros up to each byte that differs.
    pub fn differences(&mut self, now: &[u8], before: &[u8]) {
        // A copy of the coder, kept in registers through the loop (everything it calls is
        // inlined), instead of reading and writing the piece's fields for every byte.
        let (mut coder, out) = (self.coder, &mut self.out);
        // Zeros since the last difference, counted apart from the coder's own count so
        // that the loop over equal words keeps it in a register.
        let mut zeros = 0;
        let (now_words, before_words) = (now.chunks_exact(8), before.chunks_exact(8));
        let (now_rest, before_rest) = (now_words.remainder(), before_words.remainder());
        for (now, before) in now_words.zip(before_words) {
            let word = |bytes: &[u8]| u64::from_le_bytes(bytes.try_into().expect("eight bytes"));
            let mut differing = word(now) ^ word(before);
            if differing == 0 {
                zeros += 8;
                continue;
            }
            let mut done = 0;
            while differing != 0 {
                let at = (differing.trailing_zeros() / 8) as usize;
                coder.zeros += zeros + at - done;
                zeros = 0;
                coder.literal(out, now[at].wrapping_sub(before[at]));
                differing &= !(0xFF << (8 * at));
                done = at + 1;
            }
            zeros = 8 - done;
        }
        coder.zeros += zeros;
        for (n, b) in now_rest.iter().zip(before_rest) {
            match n.wrapping_sub(*b) {
                0 => coder.zeros += 1,
                value => coder.literal(out, value),
            }
        }
        self.coder = coder;
    }

    /// The piece's bytes, ending on a byte boundary (the end-of-block code, then an empty
    /// stored block: three header bits, zeros to the byte's end, length 0 and its
    /// complement), and the checksum of its data.
    pub fn finish(self) -> (Vec<u8>, Adler32) {
        let Piece { mut out, mut coder } = self;
        coder.code_zeros(&mut out);
        let (code, bits) = FIXED_CODES[256];
        coder.write(&mut out, code, bits);
        coder.write(&mut out, 0b000, 3);
        let padding = (8 - coder.count % 8) % 8;
        coder.write(&mut out, 0, padding);
        out.truncate(coder.at);
        out.extend_from_slice(&[0x00, 0x00, 0xFF, 0xFF]);
        coder.adler.reduce();
        (out, coder.adler)
    }
}

impl Coder {
    /// `count` bits (at most 32) of `bits`, least significant first: all the pending bits
    /// are stored as eight bytes, and the whole bytes among them passed.
    #[inline(always)]
    fn write(&mut self, out: &mut Vec<u8>, bits: u32, count: u32) {
        self.bits |= (bits as u64) << self.count;
        self.count += count;
        if out.len() < self.at + 8 {
            out.resize(2 * out.len() + 64, 0);
        }
        out[self.at..self.at + 8].copy_from_slice(&self.bits.to_le_bytes());
        let whole_bytes = self.count / 8;
        self.at += whole_bytes as usize;
        self.bits >>= 8 * whole_bytes;
        self.count -= 8 * whole_bytes;
    }

    /// One byte of data that is not zero, after the zeros before it.
    #[inline(always)]
    fn literal(&mut self, out: &mut Vec<u8>, value: u8) {
        if self.zeros > 0 {
            self.code_zeros(out);
        }
        let (code, bits) = FIXED_CODES[value as usize];
        self.write(out, code, bits);
        self.after_zero = false;
        self.adler.a += value as u64;
        self.adler.b += self.adler.a;
        self.adler.len += 1;
        self.unreduced += 1;
        // RFC 1950's NMAX: after 5552 bytes the sums are reduced (here they would fit in 64
        // bits for longer, but a small `a` keeps the run formula below in range).
        if self.unreduced == 5552 {
            self.adler.reduce();
            self.unreduced = 0;
        }
    }

    /// The pending zeros: a literal zero unless one came just before, then copies of it.
    #[inline(always)]
    fn code_zeros(&mut self, out: &mut Vec<u8>) {
        let mut left = self.zeros;
        if left == 0 {
            return;
        }
        self.zeros = 0;
        // Each zero leaves `a` as it is and adds `a` to `b`: `left` (a band's zeros, fewer
        // than 2^32) times `a` modulo 65521 (less than 2^16) adds less than 2^48, so `b`
        // is reduced only when it nears 2^64.
        self.adler.b += left as u64 * (self.adler.a % ADLER_MOD);
        if self.adler.b >= 1 << 63 {
            self.adler.reduce();
        }
        self.adler.len += left as u64;
        if !self.after_zero {
            self.write(out, FIXED_CODES[0].0, FIXED_CODES[0].1);
            left -= 1;
        }
        while left >= MAX_MATCH {
            let (code, bits) = COPIES[MAX_MATCH];
            self.write(out, code, bits);
            left -= MAX_MATCH;
        }
        if left >= MIN_MATCH {
            let (code, bits) = COPIES[left];
            self.write(out, code, bits);
        } else {
            for _ in 0..left {
                self.write(out, FIXED_CODES[0].0, FIXED_CODES[0].1);
            }
        }
        self.after_zero = true;
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// `data` as a whole zlib stream cut into pieces at `cuts`, each piece coded apart.
    fn stream_in_pieces(data: &[u8], cuts: &[usize]) -> Vec<u8> {
        let mut stream = ZLIB_HEADER.to_vec();
        let mut checksum = Adler32::default();
        let mut bounds = vec![0];
        bounds.extend_from_slice(cuts);
        bounds.push(data.len());
        for part in bounds.windows(2) {
            let mut piece = Piece::new(Vec::new());
            for &value in &data[part[0]..part[1]] {
                piece.byte(value);
            }
            let (bytes, adler) = piece.finish();
            stream.extend_from_slice(&bytes);
            checksum = checksum.then(&adler);
        }
        stream.extend_from_slice(&FINAL_EMPTY_BLOCK);
        stream.extend_from_slice(&checksum.value().to_be_bytes());
        stream
    }

    /// Data like a filtered wireframe: long runs of zeros, short and long, between bytes
    /// of every value.
    fn line_art(len: usize, seed: u64) -> Vec<u8> {
        let mut state = seed;
        let mut next = move || {
            // A linear congruential step (Knuth's MMIX constants), for repeatable data.
            state = state
                .wrapping_mul(6364136223846793005)
                .wrapping_add(1442695040888963407);
            (state >> 33) as usize
        };
        let mut data = Vec::with_capacity(len);
        while data.len() < len {
            let run = match next() % 4 {
                0 => next() % 4,
                1 => next() % 300,
                2 => next() % 3000,
                _ => 0,
            };
            data.extend(std::iter::repeat_n(0, run));
            for _ in 0..next() % 6 {
                data.push((next() % 256) as u8);
            }
        }
        data.truncate(len);
        data
    }

    #[test]
    fn pieces_joined_inflate_to_the_data_with_an_independent_inflater() {
        // miniz_oxide, a widely used inflater (RFC 1950/1951), checks the stream and its
        // Adler-32 trailer.
        for (len, seed) in [(0, 1), (1, 2), (2, 3), (3, 4), (259, 5), (100_000, 6)] {
            let data = line_art(len, seed);
            for cuts in [vec![], vec![len / 3, len / 2], vec![len / 2, len / 2]] {
                let stream = stream_in_pieces(&data, &cuts);
                let inflated = miniz_oxide::inflate::decompress_to_vec_zlib(&stream)
                    .unwrap_or_else(|e| panic!("{len} bytes cut at {cuts:?}: {e:?}"));
                assert!(inflated == data, "{len} bytes cut at {cuts:?}");
            }
        }
    }

    #[test]
    fn runs_of_zeros_of_every_length_around_the_copy_limits() {
        // Runs of 1..=520 zeros between ones: literals below three, copies of 3..258, and
        // runs needing two copies and a remainder of each size.
        for run in 1..=520 {
            let mut data = vec![1u8];
            data.extend(std::iter::repeat_n(0, run));
            data.push(7);
            data.extend(std::iter::repeat_n(0, run));
            let stream = stream_in_pieces(&data, &[]);
            let inflated = miniz_oxide::inflate::decompress_to_vec_zlib(&stream).unwrap();
            assert!(inflated == data, "a run of {run}");
        }
    }

    #[test]
    fn differences_code_as_their_bytes_would_one_by_one() {
        // Two rows alike but for scattered bytes, of lengths around the eight-byte words.
        for len in [0, 1, 7, 8, 9, 63, 64, 65, 1000] {
            let before = line_art(len, 11);
            let mut now = before.clone();
            for (k, byte) in now.iter_mut().enumerate() {
                if k % 13 == 5 || k % 29 == 0 {
                    *byte = byte.wrapping_add(k as u8 | 1);
                }
            }
            let expected: Vec<u8> = now
                .iter()
                .zip(&before)
                .map(|(n, b)| n.wrapping_sub(*b))
                .collect();
            let (mut by_words, mut by_bytes) = (Piece::new(Vec::new()), Piece::new(Vec::new()));
            by_words.differences(&now, &before);
            expected.iter().for_each(|&v| by_bytes.byte(v));
            let (words, bytes) = (by_words.finish(), by_bytes.finish());
            assert_eq!(words, bytes, "{len} bytes");
            let mut stream = ZLIB_HEADER.to_vec();
            stream.extend_from_slice(&words.0);
            stream.extend_from_slice(&FINAL_EMPTY_BLOCK);
            stream.extend_from_slice(&words.1.value().to_be_bytes());
            let inflated = miniz_oxide::inflate::decompress_to_vec_zlib(&stream).unwrap();
            assert!(inflated == expected, "{len} bytes");
        }
    }

    #[test]
    fn adler32_matches_an_independent_implementation_and_combines() {
        // The simd-adler32 crate (what `png` itself uses) as the reference for RFC 1950's
        // checksum; "Wikipedia" checksums to 0x11E60398 (RFC 1950's algorithm worked on the
        // ASCII bytes; from memory, and matched by the crate).
        let sum = |data: &[u8]| {
            let mut piece = Piece::new(Vec::new());
            data.iter().for_each(|&v| piece.byte(v));
            piece.finish().1
        };
        assert_eq!(sum(b"Wikipedia").value(), 0x11E6_0398);
        let data = line_art(200_000, 9);
        let whole = sum(&data);
        assert_eq!(whole.value(), simd_adler32::adler32(&data.as_slice()));
        let (first, second) = data.split_at(77_777);
        assert_eq!(sum(first).then(&sum(second)), whole);
        // Long runs of 255 test the sums' reduction.
        let dark = vec![255u8; 70_000];
        assert_eq!(sum(&dark).value(), simd_adler32::adler32(&dark.as_slice()));
    }

    #[test]
    fn the_fixed_code_is_the_one_rfc_1951_tabulates() {
        // RFC 1951, 3.2.6: literal 0 is 00110000, 143 is 10111111, 144 is 110010000, 255 is
        // 111111111, 256 is 0000000, 279 is 0010111, 280 is 11000000, 287 is 11000111.
        let code = |symbol: usize| {
            let (code, bits) = FIXED_CODES[symbol];
            (reversed(code, bits), bits)
        };
        assert_eq!(code(0), (0b0011_0000, 8));
        assert_eq!(code(143), (0b1011_1111, 8));
        assert_eq!(code(144), (0b1_1001_0000, 9));
        assert_eq!(code(255), (0b1_1111_1111, 9));
        assert_eq!(code(256), (0, 7));
        assert_eq!(code(279), (0b001_0111, 7));
        assert_eq!(code(280), (0b1100_0000, 8));
        assert_eq!(code(287), (0b1100_0111, 8));
        // RFC 1951, 3.2.5: length 10 is symbol 264 with no extra bits; 11 is 265 with extra
        // bit 0; 258 is 285. Each with distance code 0's five bits.
        assert_eq!(COPIES[10], (FIXED_CODES[264].0, 7 + 5));
        assert_eq!(COPIES[12], (FIXED_CODES[265].0 | 1 << 7, 7 + 1 + 5));
        assert_eq!(COPIES[258], (FIXED_CODES[285].0, 8 + 5));
        assert_eq!(COPIES[257], (FIXED_CODES[284].0 | 30 << 8, 8 + 5 + 5));
    }
}
