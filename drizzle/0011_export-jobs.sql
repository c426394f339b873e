CREATE TABLE `export_jobs` (
	`id` char(36) NOT NULL,
	`user_id` int NOT NULL,
	`phase` enum('queued','counting','About','Materials','Wafers','Chips','Arrays','Sessions','Locations','done','failed') NOT NULL,
	`done` int unsigned NOT NULL DEFAULT 0,
	`total` int unsigned NOT NULL DEFAULT 0,
	`started_at` datetime(3) NOT NULL,
	`finished_at` datetime(3),
	`file_name` varchar(120) NOT NULL,
	`size_bytes` bigint unsigned,
	`error` varchar(1000),
	`blob_sha256` char(64),
	`updated_at` datetime(3) NOT NULL,
	CONSTRAINT `export_jobs_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
ALTER TABLE `export_jobs` ADD CONSTRAINT `export_jobs_user_id_users_id_fk` FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `export_jobs_user_idx` ON `export_jobs` (`user_id`,`phase`);--> statement-breakpoint
CREATE INDEX `export_jobs_started_idx` ON `export_jobs` (`started_at`);--> statement-breakpoint
CREATE INDEX `export_jobs_blob_idx` ON `export_jobs` (`blob_sha256`);