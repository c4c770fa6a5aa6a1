//! Forward-only schema migrations. `schema.sql` (embedded at build time) is a list
//! of sections, each headed `-- migration N`, that move a database from version N-1
//! to N. The version lives in `PRAGMA user_version`. Before an existing database is
//! migrated, a copy of it is written beside the file; then all pending sections and
//! the version bump run in one immediate transaction, so a crash leaves either the
//! old schema or the new one, never a mix.

use std::path::{Path, PathBuf};

use rusqlite::{Connection, Transaction};

use super::backup;
use super::error::{Result, StoreError};
use super::tx;

/// The schema, as shipped.
pub const SCHEMA_SQL: &str = include_str!("../../schema.sql");

/// One section of the schema file.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Migration<'a> {
    /// The version this section brings the database to.
    pub version: i64,
    /// Its SQL.
    pub sql: &'a str,
}

/// The sections of a schema text, in order. Text before the first header is a comment.
pub fn parse_migrations(schema: &str) -> Vec<Migration<'_>> {
    let mut out = Vec::new();
    let mut current: Option<(i64, usize)> = None;
    let mut offset = 0;
    for line in schema.split_inclusive('\n') {
        let header = line
            .trim_end()
            .strip_prefix("-- migration ")
            .and_then(|n| n.trim().parse::<i64>().ok());
        if let Some(version) = header {
            if let Some((v, start)) = current.take() {
                out.push(Migration {
                    version: v,
                    sql: &schema[start..offset],
                });
            }
            current = Some((version, offset + line.len()));
        }
        offset += line.len();
    }
    if let Some((v, start)) = current {
        out.push(Migration {
            version: v,
            sql: &schema[start..],
        });
    }
    out
}

/// The shipped migrations.
pub fn migrations() -> Vec<Migration<'static>> {
    parse_migrations(SCHEMA_SQL)
}

/// The schema version this build writes.
pub fn latest_version() -> i64 {
    migrations().last().map_or(0, |m| m.version)
}

/// The schema version recorded in the file.
pub fn user_version(conn: &Connection) -> rusqlite::Result<i64> {
    conn.query_row("PRAGMA user_version", [], |r| r.get(0))
}

/// What a migration did.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Migrated {
    /// Version before.
    pub from: i64,
    /// Version after.
    pub to: i64,
    /// The copy written before migrating an existing database.
    pub backup: Option<PathBuf>,
}

impl Migrated {
    /// What to tell the user when an existing file was upgraded, naming the copy
    /// kept of it; `None` when nothing was migrated or the file was new.
    pub fn notice(&self, path: &Path) -> Option<String> {
        let backup = self.backup.as_ref()?;
        Some(format!(
            "{} was upgraded from schema version {} to {}; the file as it was is kept at {}",
            path.display(),
            self.from,
            self.to,
            backup.display()
        ))
    }
}

/// What runs inside a migration's transaction besides the SQL sections.
pub struct Hooks<'a> {
    /// Runs only when the database was new (version 0): the first run's seed.
    pub seed: &'a dyn Fn(&Transaction) -> Result<()>,
    /// Runs after the sections whenever any ran: work SQL cannot do (sealing the
    /// records signed off before seals were kept). It must be idempotent.
    pub after: &'a dyn Fn(&Transaction) -> Result<()>,
}

/// Brings the database up to the last of `steps`, running `hooks` in the same
/// transaction.
pub fn migrate(
    conn: &mut Connection,
    path: &Path,
    steps: &[Migration<'_>],
    hooks: &Hooks<'_>,
) -> Result<Migrated> {
    let target = steps.last().map_or(0, |m| m.version);
    let found = user_version(conn)?;
    if found > target {
        return Err(StoreError::TooNew {
            path: path.to_path_buf(),
            found,
            supported: target,
        });
    }
    if found == target {
        // Up to date: no lock taken, so opening never waits for writers.
        return Ok(Migrated {
            from: found,
            to: target,
            backup: None,
        });
    }
    let mut backup_path = None;
    if found > 0 && found < target {
        backup_path = Some(backup::beside(conn, path, found)?);
    }
    let from = tx::write(conn, path, |tx| {
        // Another process may have migrated while we waited for the lock.
        let from = user_version(tx)?;
        if from > target {
            return Err(StoreError::TooNew {
                path: path.to_path_buf(),
                found: from,
                supported: target,
            });
        }
        for step in steps.iter().filter(|m| m.version > from) {
            tx.execute_batch(step.sql)?;
        }
        if from < target {
            (hooks.after)(tx)?;
        }
        if from < target {
            tx.pragma_update(None, "user_version", target)?;
            // A section may edit a definition in sqlite_schema (SQLite's documented way
            // to drop a CHECK constraint), which does not tell other connections; a
            // raised schema_version makes every connection read the schema again.
            let cookie: i64 = tx.query_row("PRAGMA schema_version", [], |r| r.get(0))?;
            tx.pragma_update(None, "schema_version", cookie + 1)?;
        }
        if from == 0 {
            (hooks.seed)(tx)?;
        }
        Ok(from)
    })?;
    Ok(Migrated {
        from,
        to: target,
        backup: backup_path,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn shipped_sections_are_numbered_one_to_n() {
        let steps = migrations();
        assert!(!steps.is_empty());
        for (i, m) in steps.iter().enumerate() {
            assert_eq!(
                m.version,
                i as i64 + 1,
                "sections must be numbered 1, 2, 3..."
            );
            assert!(
                m.sql.contains(';'),
                "section {} holds no statement",
                m.version
            );
        }
    }

    #[test]
    fn sections_split_at_headers() {
        let text =
            "-- intro\n-- migration 1\nCREATE TABLE a (x);\n-- migration 2\nCREATE TABLE b (y);\n";
        let steps = parse_migrations(text);
        assert_eq!(steps.len(), 2);
        assert_eq!(steps[0].sql, "CREATE TABLE a (x);\n");
        assert_eq!(steps[1].version, 2);
        assert_eq!(steps[1].sql, "CREATE TABLE b (y);\n");
    }

    #[test]
    fn a_later_section_migrates_an_older_file_after_a_backup() {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("log.db");
        let v1 = "-- migration 1\nCREATE TABLE a (x INTEGER);\n";
        let v2 = "-- migration 1\nCREATE TABLE a (x INTEGER);\n-- migration 2\nALTER TABLE a ADD COLUMN y TEXT;\n";
        let seeded = std::cell::Cell::new(0);
        let afters = std::cell::Cell::new(0);
        let seed = |tx: &Transaction| {
            seeded.set(seeded.get() + 1);
            tx.execute("INSERT INTO a (x) VALUES (7)", [])?;
            Ok(())
        };
        let after = |_: &Transaction| {
            afters.set(afters.get() + 1);
            Ok(())
        };
        let seed = Hooks {
            seed: &seed,
            after: &after,
        };
        let mut conn = Connection::open(&path).unwrap();
        let first = migrate(&mut conn, &path, &parse_migrations(v1), &seed).unwrap();
        assert_eq!((first.from, first.to, first.backup.clone()), (0, 1, None));
        let second = migrate(&mut conn, &path, &parse_migrations(v2), &seed).unwrap();
        assert_eq!((second.from, second.to), (1, 2));
        assert_eq!(seeded.get(), 1, "seeding happens only for a new file");
        assert_eq!(afters.get(), 2, "the after-hook runs with every migration");
        let copy = second.backup.expect("a backup before migrating version 1");
        let old = Connection::open(&copy).unwrap();
        assert_eq!(user_version(&old).unwrap(), 1);
        let x: i64 = old.query_row("SELECT x FROM a", [], |r| r.get(0)).unwrap();
        assert_eq!(x, 7);
        let y: Option<String> = conn.query_row("SELECT y FROM a", [], |r| r.get(0)).unwrap();
        assert_eq!(y, None);
        // Going back to the older program is refused, and changes nothing.
        let err = migrate(&mut conn, &path, &parse_migrations(v1), &seed).unwrap_err();
        assert!(matches!(
            err,
            StoreError::TooNew {
                found: 2,
                supported: 1,
                ..
            }
        ));
        assert_eq!(user_version(&conn).unwrap(), 2);
    }
}
