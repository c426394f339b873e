CREATE TABLE `data_version` (
	`id` tinyint NOT NULL,
	`n` bigint unsigned NOT NULL,
	CONSTRAINT `data_version_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
-- The one row the app counts its committed writes in (server/db/data-version.ts).
INSERT INTO `data_version` (`id`, `n`) VALUES (1, 0);
