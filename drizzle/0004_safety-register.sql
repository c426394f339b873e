CREATE TABLE `laser_setup_signoffs` (
	`id` int AUTO_INCREMENT NOT NULL,
	`setup_id` int NOT NULL,
	`decision` enum('approved','rejected','revoked','voided') NOT NULL,
	`by_id` int NOT NULL,
	`at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`expires_on` date,
	`note` text,
	`hazard_hash` varchar(64) NOT NULL,
	CONSTRAINT `laser_setup_signoffs_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
ALTER TABLE `laser_setups` ADD `pulse_duration_fs` double;--> statement-breakpoint
ALTER TABLE `laser_setups` ADD `rep_rate_hz` double;--> statement-breakpoint
ALTER TABLE `laser_setups` ADD `max_avg_power_mw` double;--> statement-breakpoint
ALTER TABLE `laser_setups` ADD `pulse_energy_uj` double;--> statement-breakpoint
ALTER TABLE `laser_setups` ADD `beam_diameter_mm` double;--> statement-breakpoint
ALTER TABLE `laser_setups` ADD `divergence_mrad` double;--> statement-breakpoint
ALTER TABLE `laser_setups` ADD `harmonic_orders` json;--> statement-breakpoint
ALTER TABLE `laser_setups` ADD `laser_class` enum('1','1M','2','2M','3R','3B','4');--> statement-breakpoint
ALTER TABLE `laser_setups` ADD `eyewear` json;--> statement-breakpoint
ALTER TABLE `laser_setups` ADD `interlocks` text;--> statement-breakpoint
ALTER TABLE `laser_setups` ADD `controlled_area_notes` text;--> statement-breakpoint
ALTER TABLE `laser_setups` ADD `submitted_by_id` int;--> statement-breakpoint
ALTER TABLE `laser_setup_signoffs` ADD CONSTRAINT `laser_setup_signoffs_setup_id_laser_setups_id_fk` FOREIGN KEY (`setup_id`) REFERENCES `laser_setups`(`id`) ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `laser_setup_signoffs` ADD CONSTRAINT `laser_setup_signoffs_by_id_users_id_fk` FOREIGN KEY (`by_id`) REFERENCES `users`(`id`) ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `signoffs_setup_idx` ON `laser_setup_signoffs` (`setup_id`,`id`);--> statement-breakpoint
ALTER TABLE `laser_setups` ADD CONSTRAINT `laser_setups_submitted_by_id_users_id_fk` FOREIGN KEY (`submitted_by_id`) REFERENCES `users`(`id`) ON DELETE restrict ON UPDATE no action;