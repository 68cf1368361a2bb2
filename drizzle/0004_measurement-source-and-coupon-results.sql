CREATE TABLE `coupon_results` (
	`coupon_id` integer PRIMARY KEY NOT NULL,
	`tag` text NOT NULL,
	`trial_id` integer,
	`condition_id` integer,
	`run_id` integer,
	`species_id` integer NOT NULL,
	`resin_id` integer,
	`resin_lot_id` integer,
	`role` text NOT NULL,
	`source_board` text,
	`dry_mass_g` real,
	`soaked_mass_g` real,
	`cured_mass_g` real,
	`wet_test_mass_g` real,
	`drying_check_count` integer DEFAULT 0 NOT NULL,
	`first_drying_check_mass_g` real,
	`last_drying_check_mass_g` real,
	`last_drying_check_at` text,
	`dry_length_mm` real,
	`dry_width_mm` real,
	`dry_thickness_mm` real,
	`dry_volume_cm3` real,
	`cured_volume_cm3` real,
	`wet_test_volume_cm3` real,
	`dry_moisture_pct` real,
	`hardness_dry_shore_d` real,
	`hardness_dry_janka_n` real,
	`hardness_dry_brinell_hb` real,
	`hardness_cured_shore_d` real,
	`hardness_cured_janka_n` real,
	`hardness_cured_brinell_hb` real,
	`hardness_wet_test_shore_d` real,
	`hardness_wet_test_janka_n` real,
	`hardness_wet_test_brinell_hb` real,
	`thickness_mm` real,
	`mc_pct` real,
	`mc_source` text,
	`dry_density_kg_m3` real,
	`dry_sg` real,
	`wpg_pct` real,
	`wet_uptake_pct` real,
	`resin_loading_kg_m3` real,
	`void_fill_pct` real,
	`max_wpg_pct` real,
	`cure_loss_pct` real,
	`bulking_pct` real,
	`swelling_pct` real,
	`swelling_basis` text,
	`hardness` text NOT NULL,
	`problems` text NOT NULL,
	`problem_count` integer DEFAULT 0 NOT NULL,
	FOREIGN KEY (`coupon_id`) REFERENCES `coupons`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE INDEX `coupon_results_trial_idx` ON `coupon_results` (`trial_id`,`condition_id`);--> statement-breakpoint
CREATE INDEX `coupon_results_run_idx` ON `coupon_results` (`run_id`);--> statement-breakpoint
CREATE INDEX `coupon_results_species_resin_idx` ON `coupon_results` (`species_id`,`resin_id`);--> statement-breakpoint
CREATE INDEX `coupon_results_resin_idx` ON `coupon_results` (`resin_id`);--> statement-breakpoint
CREATE INDEX `coupon_results_lot_idx` ON `coupon_results` (`resin_lot_id`);--> statement-breakpoint
CREATE INDEX `coupon_results_role_idx` ON `coupon_results` (`role`,`species_id`);--> statement-breakpoint
ALTER TABLE `checks` ADD `import_id` integer;--> statement-breakpoint
ALTER TABLE `checks` ADD `source` text DEFAULT 'entry' NOT NULL;--> statement-breakpoint
CREATE INDEX `checks_import_idx` ON `checks` (`import_id`);--> statement-breakpoint
ALTER TABLE `weighings` ADD `source` text DEFAULT 'entry' NOT NULL;--> statement-breakpoint
CREATE INDEX `coupons_created_idx` ON `coupons` (`created_at`,`id`);--> statement-breakpoint
CREATE INDEX `coupons_trial_tag_idx` ON `coupons` (`trial_id`,`tag`);--> statement-breakpoint
CREATE INDEX `coupons_run_tag_idx` ON `coupons` (`run_id`,`tag`);--> statement-breakpoint
UPDATE `weighings` SET `source` = 'import:' || `import_id` WHERE `import_id` IS NOT NULL;