ALTER TABLE `mail_queue` ADD `claimed_by` varchar(64);--> statement-breakpoint
ALTER TABLE `mail_queue` ADD `claimed_until` datetime(3);