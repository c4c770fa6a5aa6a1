-- gelu batch log: the SQLite schema, embedded in the binary at build time.
--
-- The file is a list of forward-only migrations. Each section that starts with a line
-- "-- migration N" moves a database from schema version N-1 to N; the version is kept in
-- PRAGMA user_version. A released section is never edited: a change of schema is a new
-- section at the end. Every section runs inside one transaction with the version bump.
--
-- Records are legal records: triggers make recipe versions, measurements, notes,
-- amendments and analysis snapshots append-only, forbid deleting a batch, and forbid any
-- UPDATE of a batch or its lines once the batch is final. A final record is corrected by
-- a new row in `amendments` that references it.
--
-- Times are RFC 3339 UTC text with milliseconds ("2026-12-01T23:10:00.000Z"), so text
-- order is time order. Masses are grams (REAL).

-- migration 1
PRAGMA application_id = 1734700149; -- 'gelu' in ASCII: marks the file as a gelu batch log

CREATE TABLE recipes (
    id          INTEGER PRIMARY KEY,
    name        TEXT NOT NULL UNIQUE,
    created_at  TEXT NOT NULL
) STRICT;

CREATE TABLE recipe_versions (
    id           INTEGER PRIMARY KEY,
    recipe_id    INTEGER NOT NULL REFERENCES recipes(id),
    version      INTEGER NOT NULL CHECK (version >= 1),
    text         TEXT NOT NULL,
    content_hash TEXT NOT NULL,
    created_at   TEXT NOT NULL,
    UNIQUE (recipe_id, version)
) STRICT;

CREATE TRIGGER recipe_versions_immutable_update BEFORE UPDATE ON recipe_versions
BEGIN
    SELECT RAISE(ABORT, 'a recipe version is immutable; save a new version instead');
END;
CREATE TRIGGER recipe_versions_immutable_delete BEFORE DELETE ON recipe_versions
BEGIN
    SELECT RAISE(ABORT, 'a recipe version is never deleted');
END;

-- The user's own solutes and ingredients, kept as the TOML text of their definition.
CREATE TABLE custom_solutes (
    id          TEXT PRIMARY KEY,
    name        TEXT NOT NULL,
    definition  TEXT NOT NULL,
    updated_at  TEXT NOT NULL
) STRICT;

CREATE TABLE custom_ingredients (
    id          TEXT PRIMARY KEY,
    name        TEXT NOT NULL,
    definition  TEXT NOT NULL,
    updated_at  TEXT NOT NULL
) STRICT;

CREATE TABLE settings (
    key         TEXT PRIMARY KEY,
    value       TEXT NOT NULL
) STRICT;

CREATE TABLE batches (
    id                INTEGER PRIMARY KEY,
    code              TEXT NOT NULL UNIQUE,
    recipe_id         INTEGER NOT NULL REFERENCES recipes(id),
    recipe_version_id INTEGER NOT NULL REFERENCES recipe_versions(id),
    made_at           TEXT NOT NULL,
    size_g            REAL NOT NULL CHECK (size_g > 0),
    operator          TEXT NOT NULL,
    status            TEXT NOT NULL CHECK (status IN ('draft', 'final')),
    finalized_at      TEXT,
    finalized_by      TEXT,
    created_at        TEXT NOT NULL
) STRICT;

CREATE INDEX batches_by_time ON batches (made_at DESC, id DESC);
CREATE INDEX batches_by_recipe_time ON batches (recipe_id, made_at DESC, id DESC);

CREATE TRIGGER batches_final_is_final BEFORE UPDATE ON batches
WHEN OLD.status = 'final'
BEGIN
    SELECT RAISE(ABORT, 'a final batch record is never changed; add an amendment instead');
END;
CREATE TRIGGER batches_never_deleted BEFORE DELETE ON batches
BEGIN
    SELECT RAISE(ABORT, 'a batch record is never deleted');
END;
CREATE TRIGGER batches_version_matches_recipe BEFORE INSERT ON batches
WHEN NEW.recipe_id IS NOT (SELECT recipe_id FROM recipe_versions WHERE id = NEW.recipe_version_id)
BEGIN
    SELECT RAISE(ABORT, 'the recipe version does not belong to the batch''s recipe');
END;

CREATE TABLE batch_lines (
    id          INTEGER PRIMARY KEY,
    batch_id    INTEGER NOT NULL REFERENCES batches(id),
    position    INTEGER NOT NULL CHECK (position BETWEEN 1 AND 262143),
    ingredient  TEXT NOT NULL,
    planned_g   REAL NOT NULL,
    actual_g    REAL,
    lot         TEXT NOT NULL DEFAULT '',
    UNIQUE (batch_id, position)
) STRICT;

CREATE TRIGGER batch_lines_insert_open BEFORE INSERT ON batch_lines
WHEN (SELECT status FROM batches WHERE id = NEW.batch_id) = 'final'
BEGIN
    SELECT RAISE(ABORT, 'a final batch record is never changed; add an amendment instead');
END;
CREATE TRIGGER batch_lines_update_open BEFORE UPDATE ON batch_lines
WHEN (SELECT status FROM batches WHERE id = OLD.batch_id) = 'final'
BEGIN
    SELECT RAISE(ABORT, 'a final batch record is never changed; add an amendment instead');
END;
CREATE TRIGGER batch_lines_never_deleted BEFORE DELETE ON batch_lines
BEGIN
    SELECT RAISE(ABORT, 'a batch line is never deleted');
END;

CREATE TABLE measurements (
    id          INTEGER PRIMARY KEY,
    batch_id    INTEGER NOT NULL REFERENCES batches(id),
    kind        TEXT NOT NULL,
    value       REAL NOT NULL,
    unit        TEXT NOT NULL,
    taken_at    TEXT NOT NULL,
    taken_by    TEXT NOT NULL
) STRICT;
CREATE INDEX measurements_by_batch ON measurements (batch_id, id);

CREATE TABLE batch_notes (
    id          INTEGER PRIMARY KEY,
    batch_id    INTEGER NOT NULL REFERENCES batches(id),
    text        TEXT NOT NULL,
    written_at  TEXT NOT NULL,
    written_by  TEXT NOT NULL
) STRICT;
CREATE INDEX batch_notes_by_batch ON batch_notes (batch_id, id);

-- What the model predicted when the batch was made (the public analysis JSON).
CREATE TABLE batch_predictions (
    batch_id    INTEGER PRIMARY KEY REFERENCES batches(id),
    analysis    TEXT NOT NULL CHECK (json_valid(analysis))
) STRICT;

-- The amendment trail: each row corrects the batch it references. `changes` is a JSON
-- array of {field, target, old, new}.
CREATE TABLE amendments (
    id          INTEGER PRIMARY KEY,
    batch_id    INTEGER NOT NULL REFERENCES batches(id),
    amended_at  TEXT NOT NULL,
    amended_by  TEXT NOT NULL,
    reason      TEXT NOT NULL CHECK (reason <> ''),
    changes     TEXT NOT NULL CHECK (json_valid(changes))
) STRICT;
CREATE INDEX amendments_by_batch ON amendments (batch_id, id);

CREATE TRIGGER measurements_append_only_update BEFORE UPDATE ON measurements
BEGIN SELECT RAISE(ABORT, 'a measurement is never changed; record a new one'); END;
CREATE TRIGGER measurements_append_only_delete BEFORE DELETE ON measurements
BEGIN SELECT RAISE(ABORT, 'a measurement is never deleted'); END;
CREATE TRIGGER batch_notes_append_only_update BEFORE UPDATE ON batch_notes
BEGIN SELECT RAISE(ABORT, 'a note is never changed; add a new one'); END;
CREATE TRIGGER batch_notes_append_only_delete BEFORE DELETE ON batch_notes
BEGIN SELECT RAISE(ABORT, 'a note is never deleted'); END;
CREATE TRIGGER batch_predictions_append_only_update BEFORE UPDATE ON batch_predictions
BEGIN SELECT RAISE(ABORT, 'an analysis snapshot is never changed'); END;
CREATE TRIGGER batch_predictions_append_only_delete BEFORE DELETE ON batch_predictions
BEGIN SELECT RAISE(ABORT, 'an analysis snapshot is never deleted'); END;
CREATE TRIGGER amendments_append_only_update BEFORE UPDATE ON amendments
BEGIN SELECT RAISE(ABORT, 'an amendment is never changed; add a new one'); END;
CREATE TRIGGER amendments_append_only_delete BEFORE DELETE ON amendments
BEGIN SELECT RAISE(ABORT, 'an amendment is never deleted'); END;

-- Full-text search over notes, supplier lots and amendment reasons. Contentless (the
-- text lives in its own tables) and append-only, like what it indexes. The store writes
-- it at the end of each transaction (see src/store/search.rs): entry rowids are
-- batch_id * 2^20 plus a slot (a line's position; 2^18 + a note's number; 2^19 + an
-- amendment's number), so a match names its batch without a lookup.
CREATE VIRTUAL TABLE batch_search USING fts5 (
    body,
    content = '',
    tokenize = 'unicode61 remove_diacritics 2'
);

-- migration 2
-- The analysis snapshot is checked to be JSON by the store as it is written (and again
-- by `gelu db check`), so the CHECK (json_valid(analysis)) of migration 1 checked it a
-- second time on every insert: a third of the cost of importing a batch with its full
-- snapshot. It is removed by SQLite's documented procedure for dropping a CHECK
-- constraint ("Making Other Kinds Of Table Schema Changes" in the ALTER TABLE
-- documentation): the table's definition is edited in sqlite_schema, its rows are not
-- touched, and the program raises schema_version after the migration so that every
-- connection reads the schema again. A file whose definition reads otherwise is left
-- as it is (the replace finds nothing), which is safe: it only keeps the extra check.
PRAGMA writable_schema = ON;
UPDATE sqlite_schema
   SET sql = replace(sql, ' CHECK (json_valid(analysis))', '')
 WHERE type = 'table' AND name = 'batch_predictions';
PRAGMA writable_schema = OFF;

-- migration 3
-- Calibration, never silent. A correction fitted from logged batches (an offset added to
-- a prediction of one measured kind, for one recipe or one style) is kept as a numbered
-- version per (kind, scope, scope_name); `correction` is its JSON (offset, unit, the
-- batches it rests on, the shrinkage, and its basis in words). Turning a correction on
-- or off is a row of calibration_switches naming the version put in force (NULL: off).
-- The correction in force for a kind and scope is the one its latest switch names. Both
-- tables are append-only, like the records they are fitted from.
CREATE TABLE calibrations (
    id          INTEGER PRIMARY KEY,
    kind        TEXT NOT NULL,
    scope       TEXT NOT NULL CHECK (scope IN ('style', 'recipe')),
    scope_name  TEXT NOT NULL,
    version     INTEGER NOT NULL CHECK (version >= 1),
    correction  TEXT NOT NULL,
    fitted_at   TEXT NOT NULL,
    fitted_by   TEXT NOT NULL,
    UNIQUE (kind, scope, scope_name, version)
) STRICT;

CREATE TABLE calibration_switches (
    id              INTEGER PRIMARY KEY,
    kind            TEXT NOT NULL,
    scope           TEXT NOT NULL CHECK (scope IN ('style', 'recipe')),
    scope_name      TEXT NOT NULL,
    calibration_id  INTEGER REFERENCES calibrations(id),
    switched_at     TEXT NOT NULL,
    switched_by     TEXT NOT NULL
) STRICT;
CREATE INDEX calibration_switches_by_scope ON calibration_switches (kind, scope, scope_name, id);

CREATE TRIGGER calibration_switches_name_their_scope BEFORE INSERT ON calibration_switches
WHEN NEW.calibration_id IS NOT NULL AND NOT EXISTS (
    SELECT 1 FROM calibrations c WHERE c.id = NEW.calibration_id AND c.kind = NEW.kind
       AND c.scope = NEW.scope AND c.scope_name = NEW.scope_name)
BEGIN
    SELECT RAISE(ABORT, 'a switch puts in force a correction of its own kind and scope');
END;
CREATE TRIGGER calibrations_append_only_update BEFORE UPDATE ON calibrations
BEGIN SELECT RAISE(ABORT, 'a calibration version is never changed; fit a new one'); END;
CREATE TRIGGER calibrations_append_only_delete BEFORE DELETE ON calibrations
BEGIN SELECT RAISE(ABORT, 'a calibration version is never deleted'); END;
CREATE TRIGGER calibration_switches_append_only_update BEFORE UPDATE ON calibration_switches
BEGIN SELECT RAISE(ABORT, 'a calibration switch is never changed; switch again'); END;
CREATE TRIGGER calibration_switches_append_only_delete BEFORE DELETE ON calibration_switches
BEGIN SELECT RAISE(ABORT, 'a calibration switch is never deleted'); END;

-- migration 4
-- Several sites, one history (src/sync/): the log stays the working copy and a
-- PostgreSQL server is the hub that logs push to and pull from. Records written here
-- keep NULL in the new columns; a record pulled from the hub carries the site that
-- wrote it and its identity there. Only columns and tables are added, so the rows and
-- triggers of migrations 1 and 2 are untouched.
--
-- This log's site code: short, random, readable (no I, O, 0 or 1), renamable until
-- the first batch is written under it or the log first synchronises. New batch codes
-- carry it: B-YYYYMMDD-SITE-NNNN.
INSERT INTO settings (key, value)
SELECT 'site_code',
       substr('ABCDEFGHJKLMNPQRSTUVWXYZ23456789', 1 + (abs(random()) % 24), 1) ||
       substr('ABCDEFGHJKLMNPQRSTUVWXYZ23456789', 1 + (abs(random()) % 32), 1) ||
       substr('ABCDEFGHJKLMNPQRSTUVWXYZ23456789', 1 + (abs(random()) % 32), 1) ||
       substr('ABCDEFGHJKLMNPQRSTUVWXYZ23456789', 1 + (abs(random()) % 32), 1)
WHERE NOT EXISTS (SELECT 1 FROM settings WHERE key = 'site_code');

-- A recipe version pulled from the hub: the site that saved it, and its number there
-- when that number was already taken here by other text (a conflict, kept and shown).
ALTER TABLE recipe_versions ADD COLUMN site TEXT;
ALTER TABLE recipe_versions ADD COLUMN origin_version INTEGER;

-- Readings, notes and amendments pulled from the hub: the site that wrote them, their
-- place in the batch's list there (the list is read in that order, ties by time, so
-- every site lists them alike), and their identity on the hub. A row written here
-- keeps NULL and takes its place from its rank in the list.
ALTER TABLE measurements ADD COLUMN site TEXT;
ALTER TABLE measurements ADD COLUMN position INTEGER;
ALTER TABLE measurements ADD COLUMN entry_hash TEXT;
ALTER TABLE batch_notes ADD COLUMN site TEXT;
ALTER TABLE batch_notes ADD COLUMN position INTEGER;
ALTER TABLE batch_notes ADD COLUMN entry_hash TEXT;
ALTER TABLE amendments ADD COLUMN site TEXT;
ALTER TABLE amendments ADD COLUMN position INTEGER;
ALTER TABLE amendments ADD COLUMN entry_hash TEXT;
CREATE INDEX measurements_by_entry_hash ON measurements (entry_hash) WHERE entry_hash IS NOT NULL;
CREATE INDEX batch_notes_by_entry_hash ON batch_notes (entry_hash) WHERE entry_hash IS NOT NULL;
CREATE INDEX amendments_by_entry_hash ON amendments (entry_hash) WHERE entry_hash IS NOT NULL;

-- Every batch the hub holds, with the site that wrote it and its identity there
-- (pulled = 1: it came from the hub; 0: it was pushed from here).
CREATE TABLE sync_heads (
    batch_id    INTEGER PRIMARY KEY REFERENCES batches(id),
    site        TEXT NOT NULL,
    head_hash   TEXT NOT NULL,
    pulled      INTEGER NOT NULL CHECK (pulled IN (0, 1))
) STRICT;

-- Sign-offs made here that the hub has not yet been sent (a queue: sent rows leave).
CREATE TABLE sync_finals_waiting (
    batch_id    INTEGER PRIMARY KEY REFERENCES batches(id)
) STRICT;
CREATE TRIGGER batches_final_waits_for_sync AFTER UPDATE OF status ON batches
WHEN OLD.status = 'draft' AND NEW.status = 'final'
BEGIN
    INSERT OR IGNORE INTO sync_finals_waiting (batch_id) VALUES (NEW.id);
END;

-- How far pushing and pulling have got with which hub, and when the last sync ended.
CREATE TABLE sync_state (
    key         TEXT PRIMARY KEY,
    value       TEXT NOT NULL
) STRICT;

-- Records pulled from the hub that could not take their place here: another record
-- holds the same code with other content, or the row no longer matches its identity.
-- Both are kept: the local one where it was, the other here, whole, as pulled, until a
-- person decides (`gelu sync --resolve`). A decision is written once and never undone.
CREATE TABLE sync_conflicts (
    id          INTEGER PRIMARY KEY,
    kind        TEXT NOT NULL,
    code        TEXT NOT NULL,
    site        TEXT NOT NULL,
    entry_hash  TEXT NOT NULL,
    found_at    TEXT NOT NULL,
    detail      TEXT NOT NULL,
    record      TEXT NOT NULL,
    decided_at  TEXT,
    decided_by  TEXT,
    decision    TEXT,
    UNIQUE (kind, code, entry_hash)
) STRICT;
CREATE TRIGGER sync_conflicts_kept BEFORE DELETE ON sync_conflicts
BEGIN SELECT RAISE(ABORT, 'a sync conflict is never deleted; decide it with gelu sync --resolve'); END;
CREATE TRIGGER sync_conflicts_decided_once BEFORE UPDATE ON sync_conflicts
WHEN OLD.decided_at IS NOT NULL OR NEW.kind IS NOT OLD.kind OR NEW.code IS NOT OLD.code
  OR NEW.site IS NOT OLD.site OR NEW.entry_hash IS NOT OLD.entry_hash
  OR NEW.record IS NOT OLD.record OR NEW.detail IS NOT OLD.detail
BEGIN SELECT RAISE(ABORT, 'a sync conflict is kept as found and decided once'); END;

-- Decisions taken here that the hub has not yet been sent (a queue: sent rows leave).
CREATE TABLE sync_decisions_waiting (
    conflict_id INTEGER PRIMARY KEY REFERENCES sync_conflicts(id)
) STRICT;

-- migration 5
-- A final record keeps what it showed. After sign-off, new readings and notes are
-- entries on the record's amendment trail (dated, signed, with a reason), never new
-- rows here: these tables keep what was recorded before sign-off. (Logs written
-- before this version may hold later rows; they stay, with their own times.) An
-- import writes whole records, drafts and signed-off ones alike, in one transaction,
-- and lifts these two triggers as it lifts batch_lines_insert_open (see
-- src/store/guards.rs).
CREATE TRIGGER measurements_insert_open BEFORE INSERT ON measurements
WHEN (SELECT status FROM batches WHERE id = NEW.batch_id) = 'final'
BEGIN
    SELECT RAISE(ABORT, 'a final batch record takes new readings on its amendment trail');
END;
CREATE TRIGGER batch_notes_insert_open BEFORE INSERT ON batch_notes
WHEN (SELECT status FROM batches WHERE id = NEW.batch_id) = 'final'
BEGIN
    SELECT RAISE(ABORT, 'a final batch record takes new notes on its amendment trail');
END;

-- A recipe's versions are immutable, and so is the name they were saved under: a
-- renamed recipe would make every batch of it show another name.
CREATE TRIGGER recipes_named_for_good BEFORE UPDATE ON recipes
WHEN EXISTS (SELECT 1 FROM recipe_versions WHERE recipe_id = OLD.id)
BEGIN
    SELECT RAISE(ABORT, 'a recipe with saved versions is never renamed; save it under a new name instead');
END;
CREATE TRIGGER recipes_never_deleted BEFORE DELETE ON recipes
WHEN EXISTS (SELECT 1 FROM recipe_versions WHERE recipe_id = OLD.id)
BEGIN
    SELECT RAISE(ABORT, 'a recipe with saved versions is never deleted');
END;

-- Seals: the SHA-256 of a signed-off record as gelu wrote it (see src/batch/seal.rs),
-- one at sign-off (amendments = 0) and one at each entry on its trail (amendments =
-- the entries it covers). `gelu db check` recomputes them to tell which records were
-- changed behind gelu's back. Records signed off before this version are sealed as
-- they stand when the log is upgraded.
CREATE TABLE batch_seals (
    batch_id    INTEGER NOT NULL REFERENCES batches(id),
    amendments  INTEGER NOT NULL CHECK (amendments >= 0),
    sealed_at   TEXT NOT NULL,
    hash        TEXT NOT NULL,
    PRIMARY KEY (batch_id, amendments)
) STRICT, WITHOUT ROWID;

CREATE TRIGGER batch_seals_append_only_update BEFORE UPDATE ON batch_seals
BEGIN SELECT RAISE(ABORT, 'a seal is never changed'); END;
CREATE TRIGGER batch_seals_append_only_delete BEFORE DELETE ON batch_seals
BEGIN SELECT RAISE(ABORT, 'a seal is never deleted'); END;

-- migration 6
-- Pulling stays as fast however much a log has pulled before. A reading, note or
-- trail entry pulled from the hub is looked up by its identity before it is written,
-- so that one sent twice is taken once. Migration 4 indexed identities alone, in hash
-- order: each pulled entry went to a random page of an index as large as everything
-- ever pulled (a log that had pulled 150,000 readings wrote about 2,000 pages to take
-- a page of 2,000 more; a new log, about 450). Kept batch first, an entry's identity
-- sits beside those of its batch: a new batch's entries go to the end of the index,
-- and the look-up (the batch it belongs to, found first, and the identity) is as
-- direct.
DROP INDEX measurements_by_entry_hash;
DROP INDEX batch_notes_by_entry_hash;
DROP INDEX amendments_by_entry_hash;
CREATE INDEX measurements_by_batch_entry ON measurements (batch_id, entry_hash) WHERE entry_hash IS NOT NULL;
CREATE INDEX batch_notes_by_batch_entry ON batch_notes (batch_id, entry_hash) WHERE entry_hash IS NOT NULL;
CREATE INDEX amendments_by_batch_entry ON amendments (batch_id, entry_hash) WHERE entry_hash IS NOT NULL;
