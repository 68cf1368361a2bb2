CREATE TABLE `finding_comments` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`finding_id` integer NOT NULL,
	`kind` text DEFAULT 'comment' NOT NULL,
	`body_md` text NOT NULL,
	`created_at` text DEFAULT (strftime('%Y-%m-%dT%H:%M:%fZ','now')) NOT NULL,
	`created_by` integer NOT NULL,
	FOREIGN KEY (`finding_id`) REFERENCES `findings`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE INDEX `finding_comments_finding_idx` ON `finding_comments` (`finding_id`);--> statement-breakpoint
CREATE INDEX `finding_comments_author_idx` ON `finding_comments` (`created_by`);--> statement-breakpoint
CREATE TABLE `finding_evidence` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`finding_id` integer NOT NULL,
	`position` integer NOT NULL,
	`saved_view_id` integer,
	`title` text NOT NULL,
	`kind` text NOT NULL,
	`snapshot` text NOT NULL,
	`svg` text,
	`created_at` text DEFAULT (strftime('%Y-%m-%dT%H:%M:%fZ','now')) NOT NULL,
	`created_by` integer NOT NULL,
	FOREIGN KEY (`finding_id`) REFERENCES `findings`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE INDEX `finding_evidence_finding_idx` ON `finding_evidence` (`finding_id`);--> statement-breakpoint
CREATE TABLE `finding_revisions` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`finding_id` integer NOT NULL,
	`revision` integer NOT NULL,
	`title` text NOT NULL,
	`body_md` text NOT NULL,
	`trial_ids` text NOT NULL,
	`species_ids` text NOT NULL,
	`resin_ids` text NOT NULL,
	`saved_at` text NOT NULL,
	`created_at` text DEFAULT (strftime('%Y-%m-%dT%H:%M:%fZ','now')) NOT NULL,
	`created_by` integer NOT NULL,
	FOREIGN KEY (`finding_id`) REFERENCES `findings`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE UNIQUE INDEX `finding_revisions_unique` ON `finding_revisions` (`finding_id`,`revision`);--> statement-breakpoint
CREATE INDEX `finding_revisions_editor_idx` ON `finding_revisions` (`created_by`);--> statement-breakpoint
CREATE TABLE `findings` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`series_id` integer NOT NULL,
	`version` integer DEFAULT 1 NOT NULL,
	`supersedes_id` integer,
	`state` text DEFAULT 'draft' NOT NULL,
	`title` text NOT NULL,
	`body_md` text DEFAULT '' NOT NULL,
	`trial_ids` text DEFAULT '[]' NOT NULL,
	`species_ids` text DEFAULT '[]' NOT NULL,
	`resin_ids` text DEFAULT '[]' NOT NULL,
	`revision` integer DEFAULT 1 NOT NULL,
	`saved_at` text NOT NULL,
	`submitted_at` text,
	`approved_at` text,
	`created_at` text DEFAULT (strftime('%Y-%m-%dT%H:%M:%fZ','now')) NOT NULL,
	`created_by` integer NOT NULL,
	FOREIGN KEY (`supersedes_id`) REFERENCES `findings`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE INDEX `findings_state_idx` ON `findings` (`state`);--> statement-breakpoint
CREATE INDEX `findings_series_idx` ON `findings` (`series_id`);--> statement-breakpoint
CREATE INDEX `findings_created_by_idx` ON `findings` (`created_by`);--> statement-breakpoint
CREATE INDEX `findings_supersedes_idx` ON `findings` (`supersedes_id`);--> statement-breakpoint
CREATE TABLE `signatures` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`finding_id` integer NOT NULL,
	`signer_id` integer NOT NULL,
	`signer_name` text NOT NULL,
	`meaning` text NOT NULL,
	`signed_at` text NOT NULL,
	`algorithm` text NOT NULL,
	`canonical_form` text NOT NULL,
	`content_hash` text NOT NULL,
	`signed_content` text NOT NULL,
	`created_at` text DEFAULT (strftime('%Y-%m-%dT%H:%M:%fZ','now')) NOT NULL,
	`created_by` integer,
	FOREIGN KEY (`finding_id`) REFERENCES `findings`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`signer_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE UNIQUE INDEX `signatures_finding_unique` ON `signatures` (`finding_id`);--> statement-breakpoint
CREATE INDEX `signatures_signer_idx` ON `signatures` (`signer_id`);--> statement-breakpoint
CREATE TABLE `wiki_page_tags` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`page_id` integer NOT NULL,
	`kind` text NOT NULL,
	`ref_id` integer NOT NULL,
	`name` text NOT NULL,
	`created_at` text DEFAULT (strftime('%Y-%m-%dT%H:%M:%fZ','now')) NOT NULL,
	`created_by` integer,
	FOREIGN KEY (`page_id`) REFERENCES `wiki_pages`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE INDEX `wiki_page_tags_page_idx` ON `wiki_page_tags` (`page_id`);--> statement-breakpoint
CREATE INDEX `wiki_page_tags_ref_idx` ON `wiki_page_tags` (`kind`,`ref_id`);--> statement-breakpoint
CREATE TABLE `wiki_pages` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`slug` text NOT NULL,
	`finding_id` integer NOT NULL,
	`series_id` integer NOT NULL,
	`version` integer NOT NULL,
	`title` text NOT NULL,
	`body_md` text NOT NULL,
	`body_html` text NOT NULL,
	`author_id` integer NOT NULL,
	`author_name` text NOT NULL,
	`trials` text NOT NULL,
	`signature_id` integer NOT NULL,
	`approved_at` text NOT NULL,
	`superseded_by_id` integer,
	`created_at` text DEFAULT (strftime('%Y-%m-%dT%H:%M:%fZ','now')) NOT NULL,
	`created_by` integer,
	FOREIGN KEY (`finding_id`) REFERENCES `findings`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`author_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`signature_id`) REFERENCES `signatures`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`superseded_by_id`) REFERENCES `wiki_pages`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE UNIQUE INDEX `wiki_pages_slug_unique` ON `wiki_pages` (`slug`);--> statement-breakpoint
CREATE UNIQUE INDEX `wiki_pages_finding_unique` ON `wiki_pages` (`finding_id`);--> statement-breakpoint
CREATE INDEX `wiki_pages_series_idx` ON `wiki_pages` (`series_id`);--> statement-breakpoint
CREATE INDEX `wiki_pages_superseded_idx` ON `wiki_pages` (`superseded_by_id`);