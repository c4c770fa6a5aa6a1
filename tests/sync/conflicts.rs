//! Conflicts: two logs made before site codes hold different batches under the same
//! code. Both records are kept at both sites, the conflict is shown, and a person's
//! decision at one site reaches the other.
