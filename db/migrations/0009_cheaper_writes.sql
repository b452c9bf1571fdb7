-- 0009: less work for SQLite per point written (issue 8: a bulk import writes some 11 points and
-- 44 readings per check), the same records and the same answers. Together about 9 % of SQLite's
-- work per check and 3.5 % fewer pages written (results in format 2, app/api/point-pack2.ts).
--
-- 1. check_point.combined_hz: result.budget.combinedHz of points written from now on, in a column
--    of its own (db/queries/point-combined.ts says what a cell holds), so that the history index
--    of 0007 no longer has SQLite parse each new point's stored result for
--    `result_json -> '$.budget.combinedHz'` (about 6 % of SQLite's work per check; 20 % with
--    results in format 1). The index now holds coalesce(combined_hz, that expression): the column
--    when it is set, else the text the expression gave, which is what history read before.
--    Rows already written keep combined_hz NULL and are not touched: the index is built from
--    their stored results once, here, as 0007 built it. So no row is rewritten (a signed
--    revision's points are never updated, and no trigger is set aside), and the migration costs
--    an index build rather than a copy of every point (on a 100-meter fleet file about 1 s
--    instead of 3 s). db/queries/history.ts HISTORY_SQL selects exactly this expression, which
--    SQLite then reads out of the index.
--
-- 2. reading WITHOUT ROWID: its rows are found by (point_id, seq) only, which were a second b-tree
--    beside the rowid table; now they are the table's own key (one b-tree: about 5 % fewer pages
--    written and 3.5 % less of SQLite's work per check). The rows are copied as they are before
--    the table's triggers are created again, word for word as 0001 and 0002 wrote them: readings
--    of a signed revision still can be neither added, changed nor removed. All of it runs in this
--    migration's one transaction (migrate() in db/store.ts), which holds the write lock from its
--    start and is rolled back whole if anything fails, so no other connection ever sees the table
--    without its triggers.

DROP INDEX check_point_history;
ALTER TABLE check_point ADD COLUMN combined_hz;
CREATE INDEX check_point_history ON check_point (
  revision_id, seq, phase, reference_hz, dip_depth_db, error_hz, error_ppm, tolerance_hz,
  coalesce(combined_hz, result_json -> '$.budget.combinedHz')
);

DROP TRIGGER reading_locked_update;
DROP TRIGGER reading_locked_delete;
DROP TRIGGER reading_locked_insert;
ALTER TABLE reading RENAME TO reading_0008;
CREATE TABLE reading (
  point_id INTEGER NOT NULL REFERENCES check_point (id),
  seq INTEGER NOT NULL,
  value REAL NOT NULL,
  direction TEXT NOT NULL CHECK (direction IN ('up', 'down')),
  PRIMARY KEY (point_id, seq)
) WITHOUT ROWID;
INSERT INTO reading (point_id, seq, value, direction)
  SELECT point_id, seq, value, direction FROM reading_0008 ORDER BY point_id, seq;
DROP TABLE reading_0008;
CREATE TRIGGER reading_locked_update BEFORE UPDATE ON reading
WHEN (SELECT r.state FROM check_point p JOIN check_revision r ON r.id = p.revision_id WHERE p.id = OLD.point_id) <> 'draft'
BEGIN SELECT RAISE(ABORT, 'readings of a signed revision are never changed'); END;
CREATE TRIGGER reading_locked_delete BEFORE DELETE ON reading
WHEN (SELECT r.state FROM check_point p JOIN check_revision r ON r.id = p.revision_id WHERE p.id = OLD.point_id) <> 'draft'
BEGIN SELECT RAISE(ABORT, 'readings of a signed revision are never deleted'); END;
CREATE TRIGGER reading_locked_insert BEFORE INSERT ON reading
WHEN (SELECT r.state FROM check_point p JOIN check_revision r ON r.id = p.revision_id WHERE p.id = NEW.point_id) <> 'draft'
BEGIN SELECT RAISE(ABORT, 'readings are never added to a signed revision'); END;
