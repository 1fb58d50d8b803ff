//! Wells: the well table, deviation surveys, tops and positioned log samples.
