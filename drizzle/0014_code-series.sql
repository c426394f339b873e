CREATE TABLE `code_series` (
	`series` varchar(8) NOT NULL,
	`last_number` int unsigned NOT NULL DEFAULT 0,
	CONSTRAINT `code_series_series` PRIMARY KEY(`series`)
);
--> statement-breakpoint
INSERT INTO `code_series` (`series`, `last_number`) VALUES
  ('W', (SELECT COALESCE(MAX(CAST(SUBSTRING(`code`, 3) AS UNSIGNED)), 0) FROM `wafers` WHERE `code` REGEXP '^W-[0-9]+$')),
  ('L', (SELECT COALESCE(MAX(CAST(SUBSTRING(`code`, 3) AS UNSIGNED)), 0) FROM `locations` WHERE `code` REGEXP '^L-[0-9]+$'));
--> statement-breakpoint
-- updated_at is the version an Excel export writes beside each row: make every UPDATE move it, also one that forgets to set it.
ALTER TABLE `wafers` MODIFY `updated_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3) ON UPDATE CURRENT_TIMESTAMP(3);
--> statement-breakpoint
ALTER TABLE `chips` MODIFY `updated_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3) ON UPDATE CURRENT_TIMESTAMP(3);
--> statement-breakpoint
ALTER TABLE `arrays` MODIFY `updated_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3) ON UPDATE CURRENT_TIMESTAMP(3);
