CREATE TABLE `health_probe` (
	`id` integer PRIMARY KEY NOT NULL,
	`checked_at` text NOT NULL
);
