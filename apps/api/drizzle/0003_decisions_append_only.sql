-- Decisions are an append-only record: refuse UPDATE and DELETE at the database level.
CREATE TRIGGER `decisions_no_update` BEFORE UPDATE ON `decisions`
BEGIN
	SELECT RAISE(ABORT, 'decisions are immutable');
END;
--> statement-breakpoint
CREATE TRIGGER `decisions_no_delete` BEFORE DELETE ON `decisions`
BEGIN
	SELECT RAISE(ABORT, 'decisions are immutable');
END;
