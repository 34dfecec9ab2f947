//! Where a CSV text stands in the quoting rules (RFC 4180, as the csv crate
//! reads them), found by jumping from quote to quote with `memchr` instead
//! of looking at every byte: a quote opens a quoted field only at the start
//! of a field; inside, a quote ends the field or, doubled, stands for one
//! quote. Used by the line and stream limits (`limits::Bounded`) and to cut
//! a file into chunks at record boundaries (`csv_chunks`).

/// The state between two bytes.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(crate) enum Quote {
    /// At the start of a field (the text's start, or after a field's end).
    FieldStart,
    /// Inside a field that did not open with a quote.
    Unquoted,
    /// Inside a quoted field.
    Quoted,
    /// Just after a quote inside a quoted field: its end, or the first of a
    /// doubled quote.
    ClosingOrDoubled,
}

/// A scan over consecutive pieces of one text.
#[derive(Debug, Clone)]
pub(crate) struct QuoteScan {
    state: Quote,
    delimiter: u8,
    /// Whether a carriage return ends a field (it does for the csv crate; the
    /// limits' older rule counts only line feeds, kept for its messages).
    carriage_return_ends: bool,
}

impl QuoteScan {
    /// A scan at the start of a text.
    pub(crate) fn new(delimiter: u8, carriage_return_ends: bool) -> QuoteScan {
        QuoteScan {
            state: Quote::FieldStart,
            delimiter,
            carriage_return_ends,
        }
    }

    /// The state after the bytes scanned so far.
    pub(crate) fn state(&self) -> Quote {
        self.state
    }

    fn ends_field(&self, byte: u8) -> bool {
        byte == self.delimiter || byte == b'\n' || (self.carriage_return_ends && byte == b'\r')
    }

    /// Scans the next piece. `opened(offset)` is called for each quote in
    /// `bytes` that opens a quoted field. Returns the offset just after the
    /// last line feed that stands outside quotes, where a record ends (None
    /// when there is none in this piece).
    pub(crate) fn scan(&mut self, bytes: &[u8], mut opened: impl FnMut(usize)) -> Option<usize> {
        let mut at = 0;
        let mut cut = None;
        while at < bytes.len() {
            match self.state {
                Quote::FieldStart | Quote::Unquoted => {
                    let next = memchr::memchr(b'"', &bytes[at..]).map(|q| at + q);
                    let stretch_end = next.unwrap_or(bytes.len());
                    if let Some(nl) = memchr::memrchr(b'\n', &bytes[at..stretch_end]) {
                        cut = Some(at + nl + 1);
                    }
                    if stretch_end > at {
                        self.state = if self.ends_field(bytes[stretch_end - 1]) {
                            Quote::FieldStart
                        } else {
                            Quote::Unquoted
                        };
                    }
                    let Some(q) = next else { break };
                    if self.state == Quote::FieldStart {
                        opened(q);
                        self.state = Quote::Quoted;
                    } else {
                        self.state = Quote::Unquoted;
                    }
                    at = q + 1;
                }
                Quote::Quoted => match memchr::memchr(b'"', &bytes[at..]) {
                    Some(q) => {
                        self.state = Quote::ClosingOrDoubled;
                        at += q + 1;
                    }
                    None => break,
                },
                Quote::ClosingOrDoubled => {
                    let byte = bytes[at];
                    self.state = if byte == b'"' {
                        Quote::Quoted
                    } else if self.ends_field(byte) {
                        if byte == b'\n' {
                            cut = Some(at + 1);
                        }
                        Quote::FieldStart
                    } else {
                        Quote::Unquoted
                    };
                    at += 1;
                }
            }
        }
        cut
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The same rules one byte at a time: the plain definition to compare with.
    fn bytewise(bytes: &[u8], delimiter: u8, cr: bool) -> (Quote, Option<usize>, Vec<usize>) {
        let ends = |b: u8| b == delimiter || b == b'\n' || (cr && b == b'\r');
        let (mut state, mut cut, mut opened) = (Quote::FieldStart, None, Vec::new());
        for (i, &b) in bytes.iter().enumerate() {
            state = match state {
                Quote::FieldStart if b == b'"' => {
                    opened.push(i);
                    Quote::Quoted
                }
                Quote::FieldStart | Quote::Unquoted if ends(b) => Quote::FieldStart,
                Quote::FieldStart | Quote::Unquoted => Quote::Unquoted,
                Quote::Quoted if b == b'"' => Quote::ClosingOrDoubled,
                Quote::Quoted => Quote::Quoted,
                Quote::ClosingOrDoubled if b == b'"' => Quote::Quoted,
                Quote::ClosingOrDoubled if ends(b) => Quote::FieldStart,
                Quote::ClosingOrDoubled => Quote::Unquoted,
            };
            if b == b'\n' && state == Quote::FieldStart {
                cut = Some(i + 1);
            }
        }
        (state, cut, opened)
    }

    #[test]
    fn jumping_agrees_with_looking_at_every_byte_on_random_texts() {
        let alphabet = b"a1,;\"\"\n\r ";
        let mut rng = crate::stats::SplitMix64(17);
        for case in 0..20_000 {
            let len = (rng.uniform() * 24.0) as usize;
            let text: Vec<u8> = (0..len)
                .map(|_| alphabet[(rng.uniform() * alphabet.len() as f64) as usize])
                .collect();
            let cr = case % 2 == 0;
            let (state, cut, opened) = bytewise(&text, b',', cr);
            // In one piece, and in two pieces split anywhere.
            let split = (rng.uniform() * (len + 1) as f64) as usize;
            for pieces in [vec![&text[..]], vec![&text[..split], &text[split..]]] {
                let mut scan = QuoteScan::new(b',', cr);
                let (mut got_cut, mut got_opened, mut base) = (None, Vec::new(), 0);
                for piece in pieces {
                    if let Some(c) = scan.scan(piece, |o| got_opened.push(base + o)) {
                        got_cut = Some(base + c);
                    }
                    base += piece.len();
                }
                let shown = String::from_utf8_lossy(&text);
                assert_eq!(scan.state(), state, "{shown:?}");
                assert_eq!(got_cut, cut, "{shown:?}");
                assert_eq!(got_opened, opened, "{shown:?}");
            }
        }
    }
}
