-- 0006: a generation number per meter, raised by triggers whenever anything a meter's history
-- analysis reads changes: its checks and their revisions (recorded, amended, signed), their
-- points, and the meter itself (state, interval, band, minimum dip). The service keeps per-meter
-- summaries (register flags, interval evidence) in memory and trusts one only while the
-- generation it was made from is unchanged, so a write by any path or any process makes it stale.
-- Derived data only: no record lives here, and dropping the table loses nothing.
CREATE TABLE meter_generation (
  meter_id INTEGER PRIMARY KEY REFERENCES meter (id),
  generation INTEGER NOT NULL DEFAULT 1
);
INSERT INTO meter_generation (meter_id, generation) SELECT id, 1 FROM meter;

CREATE TRIGGER meter_generation_meter_insert AFTER INSERT ON meter
BEGIN
  INSERT INTO meter_generation (meter_id, generation) VALUES (NEW.id, 1)
    ON CONFLICT (meter_id) DO UPDATE SET generation = generation + 1;
END;
CREATE TRIGGER meter_generation_meter_update AFTER UPDATE ON meter
BEGIN
  INSERT INTO meter_generation (meter_id, generation) VALUES (NEW.id, 1)
    ON CONFLICT (meter_id) DO UPDATE SET generation = generation + 1;
END;
CREATE TRIGGER meter_generation_revision_insert AFTER INSERT ON check_revision
BEGIN
  INSERT INTO meter_generation (meter_id, generation)
    SELECT meter_id, 1 FROM check_event WHERE id = NEW.check_id
    ON CONFLICT (meter_id) DO UPDATE SET generation = generation + 1;
END;
CREATE TRIGGER meter_generation_revision_update AFTER UPDATE ON check_revision
BEGIN
  INSERT INTO meter_generation (meter_id, generation)
    SELECT meter_id, 1 FROM check_event WHERE id IN (OLD.check_id, NEW.check_id)
    ON CONFLICT (meter_id) DO UPDATE SET generation = generation + 1;
END;
CREATE TRIGGER meter_generation_revision_delete AFTER DELETE ON check_revision
BEGIN
  INSERT INTO meter_generation (meter_id, generation)
    SELECT meter_id, 1 FROM check_event WHERE id = OLD.check_id
    ON CONFLICT (meter_id) DO UPDATE SET generation = generation + 1;
END;
-- A point is written right after its revision, whose trigger has already fired; this one keeps
-- the generation honest should points ever be added to a draft later.
CREATE TRIGGER meter_generation_point_insert AFTER INSERT ON check_point
BEGIN
  INSERT INTO meter_generation (meter_id, generation)
    SELECT ce.meter_id, 1 FROM check_revision cr JOIN check_event ce ON ce.id = cr.check_id
    WHERE cr.id = NEW.revision_id
    ON CONFLICT (meter_id) DO UPDATE SET generation = generation + 1;
END;
CREATE TRIGGER meter_generation_point_update AFTER UPDATE ON check_point
BEGIN
  INSERT INTO meter_generation (meter_id, generation)
    SELECT ce.meter_id, 1 FROM check_revision cr JOIN check_event ce ON ce.id = cr.check_id
    WHERE cr.id IN (OLD.revision_id, NEW.revision_id)
    ON CONFLICT (meter_id) DO UPDATE SET generation = generation + 1;
END;
CREATE TRIGGER meter_generation_point_delete AFTER DELETE ON check_point
BEGIN
  INSERT INTO meter_generation (meter_id, generation)
    SELECT ce.meter_id, 1 FROM check_revision cr JOIN check_event ce ON ce.id = cr.check_id
    WHERE cr.id = OLD.revision_id
    ON CONFLICT (meter_id) DO UPDATE SET generation = generation + 1;
END;
