//! The rows of a panel file as text fields, whatever the format: CSV, or
//! Apache Parquet (recognised by its `PAR1` magic bytes, whatever the file's
//! name); `-` is standard input. Parquet values become the text a CSV export would hold, so both go
//! through the same checks: a null or a floating-point NaN is an empty
//! (missing) field, a date is `YYYY-MM-DD`, a timestamp at midnight is its
//! date and any other timestamp `YYYY-MM-DDTHH:MM:SS` (UTC, fractions of a
//! second kept), numbers in their shortest exact form.

use crate::calendar::iso;
use parquet::file::reader::{FileReader, SerializedFileReader};
use parquet::record::Field;
use parquet::record::reader::RowIter;
use std::io::Read;
use std::path::Path;

/// A source of rows.
pub enum Rows {
    /// A CSV file (or standard input) with a header line.
    Csv(Box<csv::Reader<Box<dyn Read>>>, Vec<String>),
    /// An Apache Parquet file; the counter is the rows read.
    Parquet(Box<RowIter<'static>>, Vec<String>, u64, QuietPanics),
    /// Columns held in memory (a data frame's); the counter is the rows read.
    Columns(Vec<Column>, Vec<String>, usize),
}

/// One column held in memory.
#[derive(Debug, Clone, PartialEq)]
pub enum Column {
    /// Numbers; NaN is missing. Each becomes its shortest exact text, so it
    /// is read back as the same number.
    Numbers(Vec<f64>),
    /// Text (dates, asset names, group labels); `None` is missing.
    Text(Vec<Option<String>>),
}

impl Column {
    /// Its length.
    pub fn len(&self) -> usize {
        match self {
            Column::Numbers(v) => v.len(),
            Column::Text(v) => v.len(),
        }
    }

    /// Whether it has no rows.
    pub fn is_empty(&self) -> bool {
        self.len() == 0
    }

    fn field(&self, i: usize) -> String {
        match self {
            Column::Numbers(v) if v[i].is_nan() => String::new(),
            Column::Numbers(v) => v[i].to_string(),
            Column::Text(v) => v[i].as_deref().unwrap_or("").trim().to_string(),
        }
    }
}

type Hook = Box<dyn Fn(&std::panic::PanicHookInfo<'_>) + Sync + Send + 'static>;

/// While a Parquet file is read: the Parquet reader asserts (panics) on some
/// malformed files instead of returning an error (found by fuzzing), so its
/// calls run under `catch_unwind` with a silent panic hook, which this guard
/// puts back as it was when the rows are dropped.
pub struct QuietPanics(Option<Hook>);

impl QuietPanics {
    fn new() -> Self {
        let previous = std::panic::take_hook();
        std::panic::set_hook(Box::new(|_| {}));
        Self(Some(previous))
    }
}

impl Drop for QuietPanics {
    fn drop(&mut self) {
        if let Some(h) = self.0.take() {
            std::panic::set_hook(h);
        }
    }
}

/// A call into the Parquet reader, with its panic turned into an error.
fn guarded<T>(f: impl FnOnce() -> Result<T, String>) -> Result<T, String> {
    std::panic::catch_unwind(std::panic::AssertUnwindSafe(f)).unwrap_or_else(|p| {
        let why = p
            .downcast_ref::<String>()
            .map(String::as_str)
            .or_else(|| p.downcast_ref::<&str>().copied())
            .unwrap_or("no reason given");
        Err(format!("not a readable Parquet file (its reader stopped: {why})"))
    })
}

/// Opens a Parquet file's rows under the guard.
fn parquet_rows<R: parquet::file::reader::ChunkReader + 'static>(source: R) -> Result<Rows, String> {
    let quiet = QuietPanics::new();
    let (iter, header) = guarded(|| {
        let reader = SerializedFileReader::new(source).map_err(|e| format!("not a readable Parquet file: {e}"))?;
        let header: Vec<String> =
            reader.metadata().file_metadata().schema().get_fields().iter().map(|f| f.name().to_string()).collect();
        let boxed: Box<dyn FileReader> = Box::new(reader);
        Ok((RowIter::from_file_into(boxed), header))
    })?;
    Ok(Rows::Parquet(Box::new(iter), header, 0, quiet))
}

/// Whether the file starts with Parquet's magic bytes.
fn is_parquet_file(path: &Path) -> std::io::Result<bool> {
    let mut head = [0u8; 4];
    let mut f = std::fs::File::open(path)?;
    let mut got = 0;
    while got < 4 {
        match f.read(&mut head[got..])? {
            0 => break,
            k => got += k,
        }
    }
    Ok(got == 4 && &head == b"PAR1")
}

/// A timestamp in microseconds since the epoch (UTC) as a date, or a date-time off midnight.
fn timestamp(micros: i64) -> String {
    let day = micros.div_euclid(86_400_000_000);
    let rest = micros.rem_euclid(86_400_000_000);
    if rest == 0 {
        return iso(day);
    }
    let (secs, frac) = (rest / 1_000_000, rest % 1_000_000);
    let hms = format!("{:02}:{:02}:{:02}", secs / 3600, secs / 60 % 60, secs % 60);
    if frac == 0 { format!("{}T{hms}", iso(day)) } else { format!("{}T{hms}.{frac:06}", iso(day)) }
}

/// A Parquet value as the text a CSV export would hold.
fn field_text(f: &Field) -> String {
    match f {
        Field::Null => String::new(),
        Field::Str(s) => s.clone(),
        Field::Double(v) if v.is_nan() => String::new(),
        Field::Float(v) if v.is_nan() => String::new(),
        Field::Double(v) => v.to_string(),
        Field::Float(v) => v.to_string(),
        Field::Date(d) => iso(i64::from(*d)),
        Field::TimestampMillis(ms) => timestamp(ms.saturating_mul(1000)),
        Field::TimestampMicros(us) => timestamp(*us),
        other => other.to_string(),
    }
}

impl Rows {
    /// Opens `path` as Parquet or CSV.
    ///
    /// # Errors
    /// What the OS or the format's reader said.
    pub fn open(path: &Path) -> Result<Self, String> {
        if path == Path::new("-") {
            return Self::stdin();
        }
        if is_parquet_file(path).map_err(|e| e.to_string())? {
            return parquet_rows(std::fs::File::open(path).map_err(|e| e.to_string())?);
        }
        let file = std::fs::File::open(path).map_err(|e| e.to_string())?;
        Self::csv(Box::new(file))
    }

    fn csv(input: Box<dyn Read>) -> Result<Self, String> {
        let mut rdr = csv::ReaderBuilder::new().trim(csv::Trim::All).from_reader(input);
        let header = rdr.headers().map_err(|e| e.to_string())?.iter().map(String::from).collect();
        Ok(Rows::Csv(Box::new(rdr), header))
    }

    /// Standard input: CSV streamed, or Parquet (which needs random access)
    /// read whole into memory first.
    fn stdin() -> Result<Self, String> {
        use std::io::BufRead;
        let mut input = std::io::BufReader::with_capacity(1 << 16, std::io::stdin());
        let head = input.fill_buf().map_err(|e| e.to_string())?;
        if !head.starts_with(b"PAR1") {
            return Self::csv(Box::new(input));
        }
        let mut bytes = Vec::new();
        input.read_to_end(&mut bytes).map_err(|e| e.to_string())?;
        Self::from_bytes(bytes)
    }

    /// Rows held in memory: Parquet when they start with its magic bytes, else CSV.
    ///
    /// # Errors
    /// What the format's reader said.
    pub fn from_bytes(bytes: Vec<u8>) -> Result<Self, String> {
        if bytes.starts_with(b"PAR1") {
            return parquet_rows(bytes::Bytes::from(bytes));
        }
        Self::csv(Box::new(std::io::Cursor::new(bytes)))
    }

    /// Named columns held in memory, all of one length.
    ///
    /// # Errors
    /// Columns of different lengths, naming them.
    pub fn from_columns(columns: Vec<(String, Column)>) -> Result<Self, String> {
        if let Some((first, rest)) = columns.split_first()
            && let Some((name, c)) = rest.iter().find(|(_, c)| c.len() != first.1.len())
        {
            return Err(format!(
                "column `{name}` has {} rows but column `{}` has {}; every column needs one value per row",
                c.len(),
                first.0,
                first.1.len()
            ));
        }
        let (header, data) = columns.into_iter().unzip();
        Ok(Rows::Columns(data, header, 0))
    }

    /// The column names.
    pub fn header(&self) -> &[String] {
        match self {
            Rows::Csv(_, h) | Rows::Parquet(_, h, ..) | Rows::Columns(_, h, _) => h,
        }
    }

    /// Whether rows are counted as rows with a schema (Parquet, columns in
    /// memory) rather than as lines under a header (CSV).
    pub fn is_parquet(&self) -> bool {
        matches!(self, Rows::Parquet(..) | Rows::Columns(..))
    }

    /// Reads the next row into `record`; its 1-based line (CSV) or row
    /// (Parquet), or `None` at the end.
    ///
    /// # Errors
    /// What the format's reader said.
    pub fn next(&mut self, record: &mut csv::StringRecord) -> Result<Option<u64>, String> {
        match self {
            Rows::Csv(rdr, _) => {
                let more = rdr.read_record(record).map_err(|e| e.to_string())?;
                Ok(more.then(|| record.position().map_or(0, |p| p.line())))
            }
            Rows::Parquet(iter, _, n, _) => match guarded(|| Ok(iter.next()))? {
                None => Ok(None),
                Some(row) => {
                    let row = row.map_err(|e| e.to_string())?;
                    record.clear();
                    for (_, f) in row.get_column_iter() {
                        record.push_field(field_text(f).trim());
                    }
                    *n += 1;
                    Ok(Some(*n))
                }
            },
            Rows::Columns(data, _, n) => {
                if data.first().is_none_or(|c| *n >= c.len()) {
                    return Ok(None);
                }
                record.clear();
                data.iter().for_each(|c| record.push_field(&c.field(*n)));
                *n += 1;
                Ok(Some(*n as u64))
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn timestamps_at_midnight_are_dates_and_others_keep_their_time() {
        assert_eq!(timestamp(980_899_200_000_000), "2001-01-31");
        assert_eq!(timestamp(980_899_200_000_000 + 57_600_000_000), "2001-01-31T16:00:00");
        assert_eq!(timestamp(980_899_200_000_000 + 1_500), "2001-01-31T00:00:00.001500");
        assert_eq!(field_text(&Field::Double(f64::NAN)), "");
        assert_eq!(field_text(&Field::Double(0.1)), "0.1");
        assert_eq!(field_text(&Field::Date(11_353)), "2001-01-31");
    }
}
