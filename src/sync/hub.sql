-- gelu hub: the PostgreSQL schema that site logs synchronise through, embedded in the
-- binary. gelu creates it on the first sync and upgrades it, section by section, like
-- the local schema: each "-- migration N" section moves the hub from version N-1 to N,
-- in one transaction with the version kept in gelu.meta. A hub newer than the program
-- is refused untouched.
--
-- Every record is a row that is only ever added: triggers refuse UPDATE, DELETE and
-- TRUNCATE on them, for every account, gelu's included. A record is known by its
-- identity (the SHA-256 of its content, computed by gelu and checked again by every
-- site that pulls it); a second record under the same code with other content is a
-- second row, kept beside the first: a conflict that a person decides. Every insert
-- takes one lock, so rows are numbered (seq) in the order they are committed, and a
-- site that has pulled up to a number has seen every row below it.

-- migration 1
CREATE SCHEMA IF NOT EXISTS gelu;

CREATE TABLE gelu.meta (
    key     text PRIMARY KEY,
    value   text NOT NULL
);

CREATE SEQUENCE gelu.record_seq;

CREATE TABLE gelu.recipe_versions (
    seq             bigint PRIMARY KEY DEFAULT nextval('gelu.record_seq'),
    recipe          text NOT NULL,
    version         integer NOT NULL CHECK (version >= 1),
    content_hash    text NOT NULL,
    text            text NOT NULL,
    site            text NOT NULL,
    received_at     timestamptz NOT NULL DEFAULT now(),
    UNIQUE (recipe, version, content_hash)
);

-- A batch as first written; its lines below. What follows it (sign-off, readings,
-- notes, amendments) are rows of their own that name it by code and head hash.
CREATE TABLE gelu.batches (
    seq             bigint PRIMARY KEY DEFAULT nextval('gelu.record_seq'),
    code            text NOT NULL,
    head_hash       text NOT NULL,
    site            text NOT NULL,
    recipe          text NOT NULL,
    recipe_version  integer NOT NULL,
    recipe_hash     text NOT NULL,
    made_at         timestamptz NOT NULL,
    size_g          double precision NOT NULL CHECK (size_g > 0),
    operator        text NOT NULL,
    prediction      text NOT NULL,
    received_at     timestamptz NOT NULL DEFAULT now(),
    UNIQUE (code, head_hash),
    FOREIGN KEY (recipe, recipe_version, recipe_hash)
        REFERENCES gelu.recipe_versions (recipe, version, content_hash)
);
CREATE INDEX batches_by_code ON gelu.batches (code);

CREATE TABLE gelu.batch_lines (
    code            text NOT NULL,
    head_hash       text NOT NULL,
    position        integer NOT NULL CHECK (position >= 1),
    ingredient      text NOT NULL,
    planned_g       double precision NOT NULL,
    actual_g        double precision,
    lot             text NOT NULL,
    PRIMARY KEY (code, head_hash, position),
    FOREIGN KEY (code, head_hash) REFERENCES gelu.batches (code, head_hash)
);
-- A recall: every batch that used a lot, wherever it was made.
CREATE INDEX batch_lines_by_lot ON gelu.batch_lines (lot);

CREATE TABLE gelu.finalisations (
    seq             bigint PRIMARY KEY DEFAULT nextval('gelu.record_seq'),
    code            text NOT NULL,
    head_hash       text NOT NULL,
    hash            text NOT NULL,
    finalized_at    timestamptz NOT NULL,
    finalized_by    text NOT NULL,
    site            text NOT NULL,
    received_at     timestamptz NOT NULL DEFAULT now(),
    UNIQUE (code, head_hash, hash),
    FOREIGN KEY (code, head_hash) REFERENCES gelu.batches (code, head_hash)
);

CREATE TABLE gelu.measurements (
    seq             bigint PRIMARY KEY DEFAULT nextval('gelu.record_seq'),
    code            text NOT NULL,
    head_hash       text NOT NULL,
    hash            text NOT NULL,
    position        integer NOT NULL CHECK (position >= 1),
    kind            text NOT NULL,
    value           double precision NOT NULL,
    unit            text NOT NULL,
    taken_at        timestamptz NOT NULL,
    taken_by        text NOT NULL,
    site            text NOT NULL,
    received_at     timestamptz NOT NULL DEFAULT now(),
    UNIQUE (code, head_hash, hash),
    FOREIGN KEY (code, head_hash) REFERENCES gelu.batches (code, head_hash)
);

CREATE TABLE gelu.notes (
    seq             bigint PRIMARY KEY DEFAULT nextval('gelu.record_seq'),
    code            text NOT NULL,
    head_hash       text NOT NULL,
    hash            text NOT NULL,
    position        integer NOT NULL CHECK (position >= 1),
    text            text NOT NULL,
    written_at      timestamptz NOT NULL,
    written_by      text NOT NULL,
    site            text NOT NULL,
    received_at     timestamptz NOT NULL DEFAULT now(),
    UNIQUE (code, head_hash, hash),
    FOREIGN KEY (code, head_hash) REFERENCES gelu.batches (code, head_hash)
);

-- `changes` is the JSON text the amendment was written with, kept as text so that
-- its identity can be checked; gelu does not look inside it here.
CREATE TABLE gelu.amendments (
    seq             bigint PRIMARY KEY DEFAULT nextval('gelu.record_seq'),
    code            text NOT NULL,
    head_hash       text NOT NULL,
    hash            text NOT NULL,
    position        integer NOT NULL CHECK (position >= 1),
    amended_at      timestamptz NOT NULL,
    amended_by      text NOT NULL,
    reason          text NOT NULL CHECK (reason <> ''),
    changes         text NOT NULL CHECK (changes::jsonb IS NOT NULL),
    site            text NOT NULL,
    received_at     timestamptz NOT NULL DEFAULT now(),
    UNIQUE (code, head_hash, hash),
    FOREIGN KEY (code, head_hash) REFERENCES gelu.batches (code, head_hash)
);

-- A person's decision on a conflict (both records stay; this says what holds).
CREATE TABLE gelu.decisions (
    seq             bigint PRIMARY KEY DEFAULT nextval('gelu.record_seq'),
    hash            text NOT NULL UNIQUE,
    kind            text NOT NULL,
    code            text NOT NULL,
    decided_at      timestamptz NOT NULL,
    decided_by      text NOT NULL,
    decision        text NOT NULL,
    site            text NOT NULL,
    received_at     timestamptz NOT NULL DEFAULT now()
);

CREATE FUNCTION gelu.refuse_change() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
    RAISE EXCEPTION 'gelu hub: % is append-only; a record is never changed or deleted', TG_TABLE_NAME
        USING ERRCODE = 'integrity_constraint_violation';
END $$;

-- One writer at a time (transaction-scoped): rows are numbered in commit order.
CREATE FUNCTION gelu.one_writer() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
    PERFORM pg_advisory_xact_lock(1734700149);
    RETURN NULL;
END $$;

DO $$
DECLARE t text;
BEGIN
    FOREACH t IN ARRAY ARRAY['recipe_versions', 'batches', 'batch_lines', 'finalisations',
                             'measurements', 'notes', 'amendments', 'decisions'] LOOP
        EXECUTE format('CREATE TRIGGER %I BEFORE UPDATE OR DELETE ON gelu.%I
                        FOR EACH ROW EXECUTE FUNCTION gelu.refuse_change()', t || '_append_only', t);
        EXECUTE format('CREATE TRIGGER %I BEFORE TRUNCATE ON gelu.%I
                        FOR EACH STATEMENT EXECUTE FUNCTION gelu.refuse_change()', t || '_never_emptied', t);
        EXECUTE format('CREATE TRIGGER %I BEFORE INSERT ON gelu.%I
                        FOR EACH STATEMENT EXECUTE FUNCTION gelu.one_writer()', t || '_one_writer', t);
    END LOOP;
END $$;

INSERT INTO gelu.meta (key, value)
VALUES ('hub_id', md5(random()::text || clock_timestamp()::text));
