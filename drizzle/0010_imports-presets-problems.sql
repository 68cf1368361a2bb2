CREATE TABLE `import_presets` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`name` text NOT NULL,
	`shape_key` text NOT NULL,
	`mapping` text NOT NULL,
	`created_at` text DEFAULT (strftime('%Y-%m-%dT%H:%M:%fZ','now')) NOT NULL,
	`created_by` integer,
	FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE UNIQUE INDEX `import_presets_name_unique` ON `import_presets` (`name`);--> statement-breakpoint
CREATE INDEX `import_presets_shape_idx` ON `import_presets` (`shape_key`);--> statement-breakpoint
CREATE TABLE `import_problems` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`import_id` integer NOT NULL,
	`row` integer NOT NULL,
	`column` text,
	`code` text NOT NULL,
	`outcome` text NOT NULL,
	`message` text NOT NULL,
	`suggestions` text NOT NULL,
	`cells` text NOT NULL,
	FOREIGN KEY (`import_id`) REFERENCES `imports`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE INDEX `import_problems_import_idx` ON `import_problems` (`import_id`,`row`);--> statement-breakpoint
CREATE TABLE `imports` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`original_name` text NOT NULL,
	`file_name` text NOT NULL,
	`sha256` text NOT NULL,
	`bytes` integer NOT NULL,
	`status` text DEFAULT 'uploaded' NOT NULL,
	`shape_key` text NOT NULL,
	`detected` text NOT NULL,
	`sample` text NOT NULL,
	`mapping` text,
	`stage` text,
	`counts` text,
	`preview_rows` text,
	`corrections` text,
	`error` text,
	`committed_at` text,
	`committed_by` integer,
	`undone_at` text,
	`undone_by` integer,
	`undo_reason` text,
	`created_at` text DEFAULT (strftime('%Y-%m-%dT%H:%M:%fZ','now')) NOT NULL,
	`created_by` integer,
	FOREIGN KEY (`committed_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`undone_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE INDEX `imports_sha_idx` ON `imports` (`sha256`);--> statement-breakpoint
CREATE INDEX `imports_status_idx` ON `imports` (`status`);--> statement-breakpoint
CREATE INDEX `imports_created_idx` ON `imports` (`created_at`,`id`);--> statement-breakpoint
CREATE INDEX `imports_shape_idx` ON `imports` (`shape_key`);