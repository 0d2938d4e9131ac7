//! A zlib stream (RFC 1950) written as pieces that several cores compress apart: PNG's image
//! data, band by band, each band compressed by the core that drew it.
//!
//! Each piece is one deflate block (RFC 1951) ended by an empty stored block. That ending,
//! what zlib calls a sync flush, leaves the stream on a byte boundary, so pieces made apart
//! join end to end into one valid stream; their Adler-32 checksums combine by a closed
//! formula ([`Adler32::then`]). The stream is [`ZLIB_HEADER`], the pieces in order,
//! [`FINAL_EMPTY_BLOCK`] and the combined checksum.
//!
//! Tuned for filtered line art, which is mostly zero bytes. [`Piece::differences`] takes
//! the bytes PNG's filters make (one row less another) eight at a time: equal words are
//! counted as zeros without looking at their bytes (four words a step, [`equal_words`]),
//! and a run of zeros becomes one literal zero and copies of the byte before it (distance
//! 1, up to 258 bytes a copy); a word that differs is coded as eight literals in two
//! writes, with no branch on its bytes, and its checksum taken in a few multiplications.
//! Each block carries its own Huffman code ([`LENGTHS`]: a short code for a zero, long
//! ones for the rest), so that the zeros inside a word that differs cost two bits each.
//! Measured on the benchmark's town at 8192x4096
//! (`benches/README.md`).

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

    /// Eight more bytes d0..d7 (d0 in the low byte): `a` gains their sum, `b` gains 8 a
    /// and the sum of (8 - i) di. Both sums in two multiplications each: the even and the
    /// odd bytes side by side in 16-bit lanes, a product with ones in every lane adds the
    /// lanes up into the top one, and a product with 7, 5, 3, 1 weighs lane j by 7 - 2j
    /// (then the even bytes once more make (8 - i) of (7 - 2j) + 1). No lane can overflow:
    /// at most 16 x 510 in the top lane.
    fn word(&mut self, bytes: u64) {
        const LANES: u64 = 0x00FF_00FF_00FF_00FF;
        const ONES: u64 = 0x0001_0001_0001_0001;
        const WEIGHTS: u64 = 0x0007_0005_0003_0001;
        let even = bytes & LANES;
        let pairs = even + ((bytes >> 8) & LANES);
        let sum = pairs.wrapping_mul(ONES) >> 48;
        let weighted = (pairs.wrapping_mul(WEIGHTS) >> 48) + (even.wrapping_mul(ONES) >> 48);
        self.b += 8 * self.a + weighted;
        self.a += sum;
        self.len += 8;
    }

    fn reduce(&mut self) {
        self.a %= ADLER_MOD;
        self.b %= ADLER_MOD;
    }
}

/// Literal/length symbols coded: the literals 0..=255, the end of a block (256) and the
/// copy lengths (257..=285).
const SYMBOLS: usize = 286;

/// The end-of-block symbol.
const END_OF_BLOCK: usize = 256;

/// Code lengths of the literal/length symbols, ours, for filtered wireframes: a zero (the
/// byte nearly every word holds) in 2 bits; a copy of 258 (a blank stretch of a row) in 4;
/// the other copy lengths and the 40 smallest differences either way (1..=20, 236..=255) in
/// 8; the other literals and the end of the block in 9. A complete code: 1/4 + 1/16 +
/// 28/256 + 40/256 + 216/512 = 1 (RFC 1951, 3.2.2, the Kraft sum; checked in the tests).
const LENGTHS: [u32; SYMBOLS] = {
    let mut lengths = [9; SYMBOLS];
    lengths[0] = 2;
    let mut symbol = 1;
    while symbol <= 20 {
        lengths[symbol] = 8;
        lengths[256 - symbol] = 8;
        symbol += 1;
    }
    let mut symbol = 257;
    while symbol < 285 {
        lengths[symbol] = 8;
        symbol += 1;
    }
    lengths[285] = 4;
    lengths
};

/// The distance codes: distance 1 and distance 2 (never used), one bit each, so that the
/// code is complete.
const DISTANCE_LENGTHS: [u32; 2] = [1, 1];

/// `(code, bits)` of each symbol: the canonical Huffman code of `LENGTHS` (RFC 1951,
/// 3.2.2), the code's bits reversed so that it is written least significant bit first like
/// every other field (RFC 1951, 3.1.1).
const CODES: [(u32, u32); SYMBOLS] = canonical(&LENGTHS);

/// The canonical Huffman code for `lengths` (RFC 1951, 3.2.2: codes of each length are
/// consecutive, in symbol order, after those of every shorter length), each code reversed
/// for writing. Length 0 means the symbol has no code.
const fn canonical<const N: usize>(lengths: &[u32; N]) -> [(u32, u32); N] {
    let mut count = [0u32; 16];
    let mut symbol = 0;
    while symbol < N {
        count[lengths[symbol] as usize] += 1;
        symbol += 1;
    }
    count[0] = 0;
    let mut next = [0u32; 16];
    let (mut code, mut bits) = (0, 1);
    while bits < 16 {
        code = (code + count[bits - 1]) << 1;
        next[bits] = code;
        bits += 1;
    }
    let mut codes = [(0, 0); N];
    let mut symbol = 0;
    while symbol < N {
        let length = lengths[symbol];
        if length != 0 {
            codes[symbol] = (reversed(next[length as usize], length), length);
            next[length as usize] += 1;
        }
        symbol += 1;
    }
    codes
}

/// The `bits` low bits of `code` in reverse order.
const fn reversed(code: u32, bits: u32) -> u32 {
    code.reverse_bits() >> (32 - bits)
}

/// The code-length alphabet's lengths (RFC 1951, 3.2.7) for the lengths used above: 9 in
/// one bit, 8 in two, 1 in three, 2 and 4 in four (complete: 1/2 + 1/4 + 1/8 + 2/16).
const LENGTH_CODE_LENGTHS: [u32; 19] = {
    let mut lengths = [0; 19];
    lengths[9] = 1;
    lengths[8] = 2;
    lengths[1] = 3;
    lengths[2] = 4;
    lengths[4] = 4;
    lengths
};

/// The order in which a block header gives the code-length alphabet's lengths (RFC 1951,
/// 3.2.7); ours stop after the 18th, the length of symbol 1.
const LENGTH_CODE_ORDER: [usize; 18] =
    [16, 17, 18, 0, 8, 7, 9, 6, 10, 5, 11, 4, 12, 3, 13, 2, 14, 1];

/// A block header's fields, `(value, bits)`, written least significant bit first (RFC 1951,
/// 3.2.7): not the last block, Huffman codes of its own (type 2); 286 literal/length codes,
/// 2 distance codes, 18 code-length codes (each count less its minimum); the code-length
/// alphabet's lengths; then every code length in that alphabet.
const HEADER: [(u32, u32); 4 + 18 + SYMBOLS + 2] = {
    let mut fields = [(0, 0); 4 + 18 + SYMBOLS + 2];
    fields[0] = (0b100, 3);
    fields[1] = ((SYMBOLS - 257) as u32, 5);
    fields[2] = ((DISTANCE_LENGTHS.len() - 1) as u32, 5);
    fields[3] = ((LENGTH_CODE_ORDER.len() - 4) as u32, 4);
    let length_codes = canonical(&LENGTH_CODE_LENGTHS);
    let mut k = 0;
    while k < 18 {
        fields[4 + k] = (LENGTH_CODE_LENGTHS[LENGTH_CODE_ORDER[k]], 3);
        k += 1;
    }
    let mut symbol = 0;
    while symbol < SYMBOLS {
        fields[4 + 18 + symbol] = length_codes[LENGTHS[symbol] as usize];
        symbol += 1;
    }
    fields[4 + 18 + SYMBOLS] = length_codes[DISTANCE_LENGTHS[0] as usize];
    fields[4 + 18 + SYMBOLS + 1] = length_codes[DISTANCE_LENGTHS[1] as usize];
    fields
};

/// The shortest copy a match may make, and the longest (RFC 1951, 3.2.5).
const MIN_MATCH: usize = 3;
const MAX_MATCH: usize = 258;

/// `(bits, count)` of a copy of each length 3..=258 from one byte back: the length's symbol
/// (257..=285), its extra bits, and distance code 0 (one zero bit), written as one field.
/// Lengths from RFC 1951, 3.2.5: each symbol covers `base .. base + 2^extra`, and 258 has a
/// symbol of its own (285).
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
        let (code, bits) = CODES[257 + index];
        let extra = (length - BASE[index]) as u32;
        // Distance code 0 (distance 1) is one zero bit: nothing to add but its count.
        copies[length] = (code | extra << bits, bits + EXTRA[index] + 1);
        length += 1;
    }
    copies
};

/// Each byte of `now` less the same byte of `before`, wrapping, eight at once: the borrow
/// of each byte's subtraction kept from the next by doing the top bits apart (the usual
/// SIMD-within-a-register subtraction).
fn bytewise_difference(now: u64, before: u64) -> u64 {
    const HIGH: u64 = 0x8080_8080_8080_8080;
    ((now | HIGH) - (before & !HIGH)) ^ ((now ^ !before) & HIGH)
}

/// How many bytes at the start of `now` and `before` agree, counted in whole eight-byte
/// words: up to the first word that differs, or the end of the shorter's last whole word.
/// Four words a step while they agree, their differences or-ed together. A function of its
/// own, not inlined: inside the coder's loop its counter was spilled to memory beside the
/// coder's state, and that loop was half of the encoder's time.
#[inline(never)]
fn equal_words(now: &[u8], before: &[u8]) -> usize {
    let word = |bytes: &[u8], at: usize| {
        u64::from_le_bytes(bytes[at..at + 8].try_into().expect("eight bytes"))
    };
    let whole_words = now.len().min(before.len()) / 8 * 8;
    let (now, before) = (&now[..whole_words], &before[..whole_words]);
    let mut at = 0;
    while at + 32 <= whole_words {
        let differs = |k: usize| word(now, at + k) ^ word(before, at + k);
        if differs(0) | differs(8) | differs(16) | differs(24) != 0 {
            break;
        }
        at += 32;
    }
    while at < whole_words && word(now, at) == word(before, at) {
        at += 8;
    }
    at
}

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
        for (value, bits) in HEADER {
            coder.write(&mut out, value as u64, bits);
        }
        Piece { out, coder }
    }

    /// One byte of data.
    pub fn byte(&mut self, value: u8) {
        match value {
            0 => self.coder.zeros += 1,
            _ => self.coder.literal(&mut self.out, value),
        }
    }

    /// The bytes `now[i] - before[i]` (wrapping), as PNG's filters make them.
    pub fn differences(&mut self, now: &[u8], before: &[u8]) {
        // A copy of the coder, kept in registers through the loop (everything it calls is
        // inlined).
        let (mut coder, out) = (self.coder, &mut self.out);
        let whole_words = now.len().min(before.len()) / 8 * 8;
        let mut at = 0;
        loop {
            // Equal words, most of a filtered row of line art, are zeros, counted apart.
            let same = equal_words(&now[at..whole_words], &before[at..whole_words]);
            coder.zeros += same;
            at += same;
            if at == whole_words {
                break;
            }
            let word = |bytes: &[u8]| {
                u64::from_le_bytes(bytes[at..at + 8].try_into().expect("eight bytes"))
            };
            coder.code_zeros(out);
            coder.word(out, bytewise_difference(word(now), word(before)));
            at += 8;
        }
        for (n, b) in now[at..].iter().zip(&before[at..]) {
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
        let (code, bits) = CODES[END_OF_BLOCK];
        coder.write(&mut out, code as u64, bits);
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
    /// `count` bits (at most 56) of `bits`, least significant first: all the pending bits
    /// are stored as eight bytes, and the whole bytes among them passed.
    #[inline(always)]
    fn write(&mut self, out: &mut Vec<u8>, bits: u64, count: u32) {
        self.bits |= bits << self.count;
        self.count += count;
        if out.len() < self.at + 8 {
            out.resize(2 * out.len() + 64, 0);
        }
        out[self.at..self.at + 8].copy_from_slice(&self.bits.to_le_bytes());
        let whole_bytes = self.count / 8;
        self.at += whole_bytes as usize;
        self.bits = self.bits.checked_shr(8 * whole_bytes).unwrap_or(0);
        self.count -= 8 * whole_bytes;
    }

    /// Eight bytes of data (the first in the low byte), each as a literal, in two writes.
    #[inline(always)]
    fn word(&mut self, out: &mut Vec<u8>, bytes: u64) {
        for half in [bytes, bytes >> 32] {
            let (mut field, mut count) = (0u64, 0);
            for k in 0..4 {
                let (code, bits) = CODES[(half >> (8 * k) & 0xFF) as usize];
                field |= (code as u64) << count;
                count += bits;
            }
            self.write(out, field, count);
        }
        self.after_zero = bytes >> 56 == 0;
        self.adler.word(bytes);
        self.unreduced += 8;
        if self.unreduced >= 5552 {
            self.adler.reduce();
            self.unreduced = 0;
        }
    }

    /// One byte of data that is not zero, after the zeros before it.
    #[inline(always)]
    fn literal(&mut self, out: &mut Vec<u8>, value: u8) {
        self.code_zeros(out);
        let (code, bits) = CODES[value as usize];
        self.write(out, code as u64, bits);
        self.after_zero = false;
        self.adler.a += value as u64;
        self.adler.b += self.adler.a;
        self.adler.len += 1;
        self.unreduced += 1;
        // RFC 1950's NMAX: after 5552 bytes the sums are reduced (here they would fit in 64
        // bits for longer, but a small `a` keeps the run formula below in range).
        if self.unreduced >= 5552 {
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
        let zero = (CODES[0].0 as u64, CODES[0].1);
        if !self.after_zero {
            self.write(out, zero.0, zero.1);
            left -= 1;
        }
        while left >= MAX_MATCH {
            let (code, bits) = COPIES[MAX_MATCH];
            self.write(out, code as u64, bits);
            left -= MAX_MATCH;
        }
        if left >= MIN_MATCH {
            let (code, bits) = COPIES[left];
            self.write(out, code as u64, bits);
        } else {
            for _ in 0..left {
                self.write(out, zero.0, zero.1);
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
    fn differences_inflate_to_one_row_less_the_other() {
        // Two rows alike but for scattered bytes, of lengths around the eight-byte words:
        // the words' path (literals eight at a time, checksums by multiplication) inflates
        // to the differences and checksums like simd-adler32 and the bytes' path.
        // Differences close together, and far apart (long equal stretches, taken four
        // words at a time, ended by one byte at every place in a word and in such a step).
        let close: fn(usize) -> bool = |k| k % 13 == 5 || k % 29 == 0 || (k / 100) % 7 == 3;
        let far: fn(usize) -> bool = |k| k % 173 == 0 || k % 1009 == 77;
        let lengths = [0, 1, 7, 8, 9, 31, 32, 33, 63, 64, 65, 1000, 20_000];
        for (len, differs) in lengths.iter().flat_map(|&len| [(len, close), (len, far)]) {
            let before = line_art(len, 11);
            let mut now = before.clone();
            for (k, byte) in now.iter_mut().enumerate() {
                if differs(k) {
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
            assert_eq!(words.1, bytes.1, "{len} bytes");
            assert_eq!(words.1.value(), simd_adler32::adler32(&expected.as_slice()));
            let mut stream = ZLIB_HEADER.to_vec();
            stream.extend_from_slice(&words.0);
            stream.extend_from_slice(&FINAL_EMPTY_BLOCK);
            stream.extend_from_slice(&words.1.value().to_be_bytes());
            let inflated = miniz_oxide::inflate::decompress_to_vec_zlib(&stream).unwrap();
            assert!(inflated == expected, "{len} bytes");
        }
    }

    #[test]
    fn equal_words_end_at_the_word_that_differs() {
        // Against the definition byte by byte: one byte changed at every place of 100
        // bytes (whole words: 96), and none.
        let before: Vec<u8> = (0..100u8).map(|k| k.wrapping_mul(37)).collect();
        assert_eq!(equal_words(&before, &before), 96);
        assert_eq!(equal_words(&before[..5], &before[..5]), 0);
        for changed in 0..100 {
            let mut now = before.clone();
            now[changed] ^= 0x40;
            let first_difference = now.iter().zip(&before).position(|(n, b)| n != b);
            let expected = first_difference.map_or(96, |at| (at / 8 * 8).min(96));
            assert_eq!(
                equal_words(&now, &before),
                expected,
                "byte {changed} changed"
            );
        }
        // Two words of one step changed alike (the same bit of the same byte): their
        // differences are equal, and must not cancel.
        for (first, second) in [(0, 1), (0, 2), (0, 3), (1, 2), (1, 3), (2, 3)] {
            let mut now = before.clone();
            now[8 * first + 5] ^= 0x04;
            now[8 * second + 5] ^= 0x04;
            assert_eq!(
                equal_words(&now, &before),
                8 * first,
                "words {first} and {second} changed alike"
            );
        }
    }

    #[test]
    fn eight_bytes_less_eight_others_at_once() {
        // Against the byte-by-byte wrapping subtraction, on words with every borrow.
        let mut state = 7u64;
        for _ in 0..10_000 {
            state = state
                .wrapping_mul(6364136223846793005)
                .wrapping_add(1442695040888963407);
            let (now, before) = (state, state.rotate_left(29) ^ 0x8000_0080_7F01_00FF);
            let expected = u64::from_le_bytes(std::array::from_fn(|k| {
                now.to_le_bytes()[k].wrapping_sub(before.to_le_bytes()[k])
            }));
            assert_eq!(bytewise_difference(now, before), expected);
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
    fn canonical_codes_are_those_of_rfc_1951() {
        // RFC 1951, 3.2.2's example: lengths (3, 3, 3, 3, 3, 2, 4, 4) for A..H give 010,
        // 011, 100, 101, 110, 00, 1110, 1111.
        let codes = canonical(&[3, 3, 3, 3, 3, 2, 4, 4]);
        let written: Vec<(u32, u32)> = codes.iter().map(|&(c, b)| (reversed(c, b), b)).collect();
        assert_eq!(
            written,
            [
                (0b010, 3),
                (0b011, 3),
                (0b100, 3),
                (0b101, 3),
                (0b110, 3),
                (0b00, 2),
                (0b1110, 4),
                (0b1111, 4)
            ]
        );
        // RFC 1951, 3.2.6: the fixed code is the canonical code of 8, 9, 7 and 8 bits for
        // 0..=143, 144..=255, 256..=279, 280..=287: 0 is 00110000, 143 10111111, 144
        // 110010000, 255 111111111, 256 0000000, 279 0010111, 280 11000000, 287 11000111.
        let fixed: [u32; 288] = std::array::from_fn(|s| match s {
            0..=143 => 8,
            144..=255 => 9,
            256..=279 => 7,
            _ => 8,
        });
        let codes = canonical(&fixed);
        let code = |s: usize| (reversed(codes[s].0, codes[s].1), codes[s].1);
        assert_eq!(code(0), (0b0011_0000, 8));
        assert_eq!(code(143), (0b1011_1111, 8));
        assert_eq!(code(144), (0b1_1001_0000, 9));
        assert_eq!(code(255), (0b1_1111_1111, 9));
        assert_eq!(code(256), (0, 7));
        assert_eq!(code(279), (0b001_0111, 7));
        assert_eq!(code(280), (0b1100_0000, 8));
        assert_eq!(code(287), (0b1100_0111, 8));
    }

    #[test]
    fn our_codes_are_complete_and_copies_follow_rfc_1951() {
        // A prefix code is complete when the Kraft sum of 2^-length is exactly 1 (RFC 1951,
        // 3.2.2; inflaters refuse a code with room left over).
        let kraft = |lengths: &[u32]| -> f64 {
            lengths
                .iter()
                .filter(|&&l| l > 0)
                .map(|&l| 0.5f64.powi(l as i32))
                .sum()
        };
        assert_eq!(kraft(&LENGTHS), 1.0);
        assert_eq!(kraft(&DISTANCE_LENGTHS), 1.0);
        assert_eq!(kraft(&LENGTH_CODE_LENGTHS), 1.0);
        // RFC 1951, 3.2.5: length 10 is symbol 264 with no extra bits; 12 is 265 with extra
        // bit 1; 257 is 284 with extra 30; 258 is 285. Each with distance code 0's one bit.
        assert_eq!(COPIES[10], (CODES[264].0, 8 + 1));
        assert_eq!(COPIES[12], (CODES[265].0 | 1 << 8, 8 + 1 + 1));
        assert_eq!(COPIES[257], (CODES[284].0 | 30 << 8, 8 + 5 + 1));
        assert_eq!(COPIES[258], (CODES[285].0, 4 + 1));
    }
}
