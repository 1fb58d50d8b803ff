//! Small helpers for the CSV inputs (well table, surveys, tops).
