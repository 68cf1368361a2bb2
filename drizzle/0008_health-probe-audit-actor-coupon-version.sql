CREATE TABLE `health_probe` (
	`id` integer PRIMARY KEY NOT NULL,
	`checked_at` text NOT NULL
);
--> statement-breakpoint
ALTER TABLE `audit_log` ADD `actor_name` text;--> statement-breakpoint
ALTER TABLE `audit_log` ADD `actor_email` text;--> statement-breakpoint
ALTER TABLE `coupons` ADD `version` integer DEFAULT 1 NOT NULL;--> statement-breakpoint
-- Entries written before this migration get the names the accounts have now: the best that is known.
UPDATE `audit_log` SET `actor_name` = (SELECT `name` FROM `users` WHERE `users`.`id` = `audit_log`.`actor_id`), `actor_email` = (SELECT `email` FROM `users` WHERE `users`.`id` = `audit_log`.`actor_id`) WHERE `actor_id` IS NOT NULL;--> statement-breakpoint
-- Every entry, whichever code writes it, keeps its actor's name and e-mail as they are at that moment.
CREATE TRIGGER `audit_log_actor_at_the_time` AFTER INSERT ON `audit_log`
FOR EACH ROW WHEN NEW.`actor_id` IS NOT NULL AND NEW.`actor_name` IS NULL
BEGIN
  UPDATE `audit_log` SET
    `actor_name` = (SELECT `name` FROM `users` WHERE `users`.`id` = NEW.`actor_id`),
    `actor_email` = (SELECT `email` FROM `users` WHERE `users`.`id` = NEW.`actor_id`)
  WHERE `id` = NEW.`id`;
END;
