CREATE TABLE `channel_sets` (
	`set_key` varchar(64) NOT NULL,
	`channels` json NOT NULL,
	`engine_version` varchar(20) NOT NULL,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `channel_sets_set_key` PRIMARY KEY(`set_key`)
);
--> statement-breakpoint
ALTER TABLE `arrays` ADD `channel_set_key` varchar(64);--> statement-breakpoint
-- Keep the channels already computed: one row per distinct JSON, keyed by its SHA-256 (new rows are
-- keyed by the app from its own serialisation; both keys are content hashes, so either finds its set).
INSERT IGNORE INTO `channel_sets` (`set_key`, `channels`, `engine_version`)
  SELECT SHA2(`channels`, 256), `channels`, COALESCE(`engine_version`, '') FROM `arrays` WHERE `channels` IS NOT NULL;--> statement-breakpoint
UPDATE `arrays` SET `channel_set_key` = SHA2(`channels`, 256) WHERE `channels` IS NOT NULL;--> statement-breakpoint
ALTER TABLE `arrays` ADD CONSTRAINT `arrays_channel_set_key_channel_sets_set_key_fk` FOREIGN KEY (`channel_set_key`) REFERENCES `channel_sets`(`set_key`) ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `arrays` DROP COLUMN `channels`;