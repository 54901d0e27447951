-- Prefix indexes for the event log's full-text search: the last word a person types is matched as a prefix.
DROP TRIGGER `events_fts_ai`;
--> statement-breakpoint
DROP TRIGGER `events_fts_ad`;
--> statement-breakpoint
DROP TRIGGER `events_fts_au`;
--> statement-breakpoint
DROP TABLE `events_fts`;
--> statement-breakpoint
CREATE VIRTUAL TABLE `events_fts` USING fts5(`text`, `actor`, `action`, content='events', content_rowid='id', tokenize='unicode61 remove_diacritics 2', prefix='2 3 4');
--> statement-breakpoint
INSERT INTO `events_fts`(`events_fts`) VALUES ('rebuild');
--> statement-breakpoint
CREATE TRIGGER `events_fts_ai` AFTER INSERT ON `events` BEGIN
  INSERT INTO `events_fts`(rowid, `text`, `actor`, `action`) VALUES (new.id, new.text, new.actor, new.action);
END;
--> statement-breakpoint
CREATE TRIGGER `events_fts_ad` AFTER DELETE ON `events` BEGIN
  INSERT INTO `events_fts`(`events_fts`, rowid, `text`, `actor`, `action`) VALUES ('delete', old.id, old.text, old.actor, old.action);
END;
--> statement-breakpoint
CREATE TRIGGER `events_fts_au` AFTER UPDATE ON `events` BEGIN
  INSERT INTO `events_fts`(`events_fts`, rowid, `text`, `actor`, `action`) VALUES ('delete', old.id, old.text, old.actor, old.action);
  INSERT INTO `events_fts`(rowid, `text`, `actor`, `action`) VALUES (new.id, new.text, new.actor, new.action);
END;
