CREATE TABLE `analysis_fits` (
	`id` int AUTO_INCREMENT NOT NULL,
	`session_id` int NOT NULL,
	`array_id` int,
	`file_id` int NOT NULL,
	`kind` enum('polar_fit','spectrum_peak') NOT NULL,
	`params` json NOT NULL,
	`result` json NOT NULL,
	`version` varchar(60) NOT NULL,
	`created_by` int NOT NULL,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `analysis_fits_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
ALTER TABLE `analysis_fits` ADD CONSTRAINT `analysis_fits_session_id_measurement_sessions_id_fk` FOREIGN KEY (`session_id`) REFERENCES `measurement_sessions`(`id`) ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `analysis_fits` ADD CONSTRAINT `analysis_fits_array_id_arrays_id_fk` FOREIGN KEY (`array_id`) REFERENCES `arrays`(`id`) ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `analysis_fits` ADD CONSTRAINT `analysis_fits_file_id_files_id_fk` FOREIGN KEY (`file_id`) REFERENCES `files`(`id`) ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `analysis_fits` ADD CONSTRAINT `analysis_fits_created_by_users_id_fk` FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `analysis_fits_session_idx` ON `analysis_fits` (`session_id`,`id`);--> statement-breakpoint
CREATE INDEX `analysis_fits_array_idx` ON `analysis_fits` (`array_id`);