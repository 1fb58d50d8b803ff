//! Horizon picks: scattered x y z points.
