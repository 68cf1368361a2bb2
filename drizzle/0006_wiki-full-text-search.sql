-- Full-text search over the wiki (hand-written: Drizzle has no schema type for SQLite virtual tables).
-- One row per wiki page, rowid = wiki_pages.id. The app writes it in the same transaction that publishes
-- the page; pages never change afterwards, so no triggers are needed.
-- porter + unicode61: English stemming ("stabilized" finds "stabilize"), case and diacritics folded.
CREATE VIRTUAL TABLE `wiki_fts` USING fts5(
	`title`,
	`body`,
	`tags`,
	tokenize = 'porter unicode61 remove_diacritics 2'
);
