-- Full-text index over the event log (external content: the text lives once, in events).
CREATE VIRTUAL TABLE `events_fts` USING fts5(`text`, `actor`, `action`, content='events', content_rowid='id', tokenize='unicode61 remove_diacritics 2');
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
