//! SEG-Y rev 1 volumes on the survey grid: streaming writer and checking reader.
