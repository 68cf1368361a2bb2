CREATE INDEX `coupon_results_dry_waiting_idx` ON `coupon_results` (`run_id`,`tag`) WHERE dry_mass_g is null;--> statement-breakpoint
CREATE INDEX `coupon_results_soaked_waiting_idx` ON `coupon_results` (`run_id`,`role`,`tag`) WHERE soaked_mass_g is null;--> statement-breakpoint
CREATE INDEX `coupon_results_cured_waiting_idx` ON `coupon_results` (`run_id`,`role`,`tag`) WHERE cured_mass_g is null;