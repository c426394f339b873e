CREATE TABLE `notice_log` (
	`id` int AUTO_INCREMENT NOT NULL,
	`notice_key` varchar(120) NOT NULL,
	`sent_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `notice_log_id` PRIMARY KEY(`id`),
	CONSTRAINT `notice_log_key_uq` UNIQUE(`notice_key`)
);
