//! Thomsen (1986) parameters of VTI media and their relation to stiffnesses.
