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
