CREATE TABLE `throttle_hits` (
	`hit_key` varchar(80) NOT NULL,
	`hits` int NOT NULL,
	`reset_at` datetime(3) NOT NULL,
	CONSTRAINT `throttle_hits_hit_key` PRIMARY KEY(`hit_key`)
);
--> statement-breakpoint
CREATE INDEX `throttle_hits_reset_idx` ON `throttle_hits` (`reset_at`);