CREATE TABLE `checks` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`coupon_id` integer NOT NULL,
	`kind` text NOT NULL,
	`stage` text NOT NULL,
	`measured_at` text NOT NULL,
	`length_mm` real,
	`width_mm` real,
	`thickness_mm` real,
	`volume_cm3` real,
	`hardness_value` real,
	`hardness_scale` text,
	`moisture_pct` real,
	`method` text,
	`superseded_by` integer,
	`deleted_at` text,
	`created_at` text DEFAULT (strftime('%Y-%m-%dT%H:%M:%fZ','now')) NOT NULL,
	`created_by` integer,
	FOREIGN KEY (`coupon_id`) REFERENCES `coupons`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE INDEX `checks_coupon_idx` ON `checks` (`coupon_id`,`kind`,`stage`);--> statement-breakpoint
CREATE TABLE `coupons` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`tag` text NOT NULL,
	`trial_id` integer,
	`condition_id` integer,
	`species_id` integer NOT NULL,
	`role` text NOT NULL,
	`source_board` text,
	`run_id` integer,
	`notes` text,
	`created_at` text DEFAULT (strftime('%Y-%m-%dT%H:%M:%fZ','now')) NOT NULL,
	`created_by` integer,
	FOREIGN KEY (`trial_id`) REFERENCES `trials`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`condition_id`) REFERENCES `trial_conditions`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`species_id`) REFERENCES `species`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`run_id`) REFERENCES `runs`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE UNIQUE INDEX `coupons_tag_unique` ON `coupons` (`tag`);--> statement-breakpoint
CREATE INDEX `coupons_trial_idx` ON `coupons` (`trial_id`);--> statement-breakpoint
CREATE INDEX `coupons_condition_idx` ON `coupons` (`condition_id`);--> statement-breakpoint
CREATE INDEX `coupons_species_idx` ON `coupons` (`species_id`);--> statement-breakpoint
CREATE INDEX `coupons_run_idx` ON `coupons` (`run_id`);--> statement-breakpoint
CREATE TABLE `photos` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`coupon_id` integer,
	`run_id` integer,
	`kind` text NOT NULL,
	`file_name` text NOT NULL,
	`original_name` text NOT NULL,
	`mime_type` text NOT NULL,
	`bytes` integer NOT NULL,
	`sha256` text NOT NULL,
	`caption` text,
	`created_at` text DEFAULT (strftime('%Y-%m-%dT%H:%M:%fZ','now')) NOT NULL,
	`created_by` integer,
	FOREIGN KEY (`coupon_id`) REFERENCES `coupons`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`run_id`) REFERENCES `runs`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE INDEX `photos_coupon_idx` ON `photos` (`coupon_id`);--> statement-breakpoint
CREATE INDEX `photos_run_idx` ON `photos` (`run_id`);--> statement-breakpoint
CREATE TABLE `weighings` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`coupon_id` integer NOT NULL,
	`stage` text NOT NULL,
	`mass_g` real NOT NULL,
	`measured_at` text NOT NULL,
	`import_id` integer,
	`superseded_by` integer,
	`deleted_at` text,
	`created_at` text DEFAULT (strftime('%Y-%m-%dT%H:%M:%fZ','now')) NOT NULL,
	`created_by` integer,
	FOREIGN KEY (`coupon_id`) REFERENCES `coupons`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE INDEX `weighings_coupon_idx` ON `weighings` (`coupon_id`,`stage`);--> statement-breakpoint
CREATE INDEX `weighings_import_idx` ON `weighings` (`import_id`);--> statement-breakpoint
CREATE TABLE `resin_lots` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`resin_id` integer NOT NULL,
	`code` text NOT NULL,
	`activated_at` text NOT NULL,
	`catalyst_notes` text,
	`dye_notes` text,
	`volume_ml` real NOT NULL,
	`reuse_count` integer DEFAULT 0 NOT NULL,
	`status` text DEFAULT 'active' NOT NULL,
	`notes` text,
	`created_at` text DEFAULT (strftime('%Y-%m-%dT%H:%M:%fZ','now')) NOT NULL,
	`created_by` integer,
	FOREIGN KEY (`resin_id`) REFERENCES `resins`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE UNIQUE INDEX `resin_lots_code_unique` ON `resin_lots` (`code`);--> statement-breakpoint
CREATE INDEX `resin_lots_resin_idx` ON `resin_lots` (`resin_id`);--> statement-breakpoint
CREATE INDEX `resin_lots_status_idx` ON `resin_lots` (`status`);--> statement-breakpoint
CREATE TABLE `resins` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`name` text NOT NULL,
	`kind` text NOT NULL,
	`liquid_density_g_cm3` real NOT NULL,
	`cured_density_g_cm3` real NOT NULL,
	`cure_min_c` real DEFAULT 93 NOT NULL,
	`cure_max_c` real DEFAULT 121 NOT NULL,
	`shelf_life_days` integer DEFAULT 365 NOT NULL,
	`notes` text,
	`created_at` text DEFAULT (strftime('%Y-%m-%dT%H:%M:%fZ','now')) NOT NULL,
	`created_by` integer,
	FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE UNIQUE INDEX `resins_name_unique` ON `resins` (`name`);--> statement-breakpoint
CREATE TABLE `species` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`common_name` text NOT NULL,
	`botanical_name` text NOT NULL,
	`basic_sg` real,
	`sg_12` real,
	`side_hardness_n` real,
	`measured_density_kg_m3` real,
	`measured_moisture_pct` real,
	`sg_cov` real,
	`source` text NOT NULL,
	`origin` text NOT NULL,
	`notes` text,
	`created_at` text DEFAULT (strftime('%Y-%m-%dT%H:%M:%fZ','now')) NOT NULL,
	`created_by` integer,
	FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE UNIQUE INDEX `species_common_name_unique` ON `species` (`common_name`);--> statement-breakpoint
CREATE INDEX `species_origin_idx` ON `species` (`origin`);--> statement-breakpoint
CREATE TABLE `run_readings` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`run_id` integer NOT NULL,
	`stage` text NOT NULL,
	`at` text NOT NULL,
	`gauge_value` real NOT NULL,
	`gauge_unit` text NOT NULL,
	`absolute_kpa` real NOT NULL,
	`percent_vacuum` real NOT NULL,
	`created_at` text DEFAULT (strftime('%Y-%m-%dT%H:%M:%fZ','now')) NOT NULL,
	`created_by` integer,
	FOREIGN KEY (`run_id`) REFERENCES `runs`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE INDEX `run_readings_run_idx` ON `run_readings` (`run_id`);--> statement-breakpoint
CREATE TABLE `run_stages` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`run_id` integer NOT NULL,
	`stage` text NOT NULL,
	`started_at` text NOT NULL,
	`ended_at` text,
	`planned_minutes` integer,
	`bubbling_stopped_at` text,
	`oven_set_c` real,
	`oven_measured_c` real,
	`notes` text,
	`created_at` text DEFAULT (strftime('%Y-%m-%dT%H:%M:%fZ','now')) NOT NULL,
	`created_by` integer,
	FOREIGN KEY (`run_id`) REFERENCES `runs`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE UNIQUE INDEX `run_stages_run_stage_unique` ON `run_stages` (`run_id`,`stage`);--> statement-breakpoint
CREATE INDEX `run_stages_run_idx` ON `run_stages` (`run_id`);--> statement-breakpoint
CREATE TABLE `runs` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`code` text NOT NULL,
	`chamber` text NOT NULL,
	`resin_lot_id` integer,
	`altitude_m` real NOT NULL,
	`notes` text,
	`created_at` text DEFAULT (strftime('%Y-%m-%dT%H:%M:%fZ','now')) NOT NULL,
	`created_by` integer,
	FOREIGN KEY (`resin_lot_id`) REFERENCES `resin_lots`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE UNIQUE INDEX `runs_code_unique` ON `runs` (`code`);--> statement-breakpoint
CREATE INDEX `runs_lot_idx` ON `runs` (`resin_lot_id`);--> statement-breakpoint
CREATE TABLE `trial_conditions` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`trial_id` integer NOT NULL,
	`species_id` integer NOT NULL,
	`resin_id` integer NOT NULL,
	`process_label` text NOT NULL,
	`vacuum_minutes` integer,
	`soak_minutes` integer,
	`cure_temp_c` real,
	`cure_minutes` integer,
	`thickness_mm` real,
	`coupons_wanted` integer NOT NULL,
	`created_at` text DEFAULT (strftime('%Y-%m-%dT%H:%M:%fZ','now')) NOT NULL,
	`created_by` integer,
	FOREIGN KEY (`trial_id`) REFERENCES `trials`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`species_id`) REFERENCES `species`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`resin_id`) REFERENCES `resins`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE INDEX `trial_conditions_trial_idx` ON `trial_conditions` (`trial_id`);--> statement-breakpoint
CREATE INDEX `trial_conditions_species_idx` ON `trial_conditions` (`species_id`);--> statement-breakpoint
CREATE INDEX `trial_conditions_resin_idx` ON `trial_conditions` (`resin_id`);--> statement-breakpoint
CREATE TABLE `trials` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`code` text NOT NULL,
	`title` text NOT NULL,
	`question` text NOT NULL,
	`status` text DEFAULT 'planning' NOT NULL,
	`controls_per_species` integer DEFAULT 2 NOT NULL,
	`notes` text,
	`created_at` text DEFAULT (strftime('%Y-%m-%dT%H:%M:%fZ','now')) NOT NULL,
	`created_by` integer,
	FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE UNIQUE INDEX `trials_code_unique` ON `trials` (`code`);--> statement-breakpoint
CREATE INDEX `trials_status_idx` ON `trials` (`status`);