ALTER TABLE `laser_setups` ADD `submitted_at` datetime(3);--> statement-breakpoint
UPDATE `laser_setups` SET `submitted_at` = `created_at` WHERE `submitted_at` IS NULL;
