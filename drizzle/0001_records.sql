CREATE TABLE `arrays` (
	`id` int AUTO_INCREMENT NOT NULL,
	`code` varchar(32) NOT NULL,
	`chip_id` int NOT NULL,
	`position` varchar(6) NOT NULL,
	`shape` varchar(20) NOT NULL,
	`dimensions_nm` json NOT NULL,
	`shape_azimuth_deg` double NOT NULL DEFAULT 0,
	`lattice` varchar(20) NOT NULL,
	`period_x_nm` double,
	`period_y_nm` double,
	`azimuth_deg` double NOT NULL DEFAULT 0,
	`count` int NOT NULL DEFAULT 1,
	`custom_rotation_order` int,
	`custom_mirrors` json,
	`symmetry_name` varchar(12),
	`channels` json,
	`engine_version` varchar(20),
	`channels_input_hash` varchar(64),
	`channels_computed_at` datetime(3),
	`notes` text,
	`retired_at` datetime(3),
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `arrays_id` PRIMARY KEY(`id`),
	CONSTRAINT `arrays_code_unique` UNIQUE(`code`),
	CONSTRAINT `arrays_chip_position_uq` UNIQUE(`chip_id`,`position`)
);
--> statement-breakpoint
CREATE TABLE `chips` (
	`id` int AUTO_INCREMENT NOT NULL,
	`code` varchar(24) NOT NULL,
	`wafer_id` int NOT NULL,
	`chip_index` int NOT NULL,
	`rotation_deg` double NOT NULL DEFAULT 0,
	`width_mm` double NOT NULL,
	`height_mm` double NOT NULL,
	`location_id` int,
	`holder_id` int,
	`status` enum('in_stock','in_process','measured','used_up','retired') NOT NULL DEFAULT 'in_stock',
	`notes` text,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `chips_id` PRIMARY KEY(`id`),
	CONSTRAINT `chips_code_unique` UNIQUE(`code`),
	CONSTRAINT `chips_wafer_index_uq` UNIQUE(`wafer_id`,`chip_index`)
);
--> statement-breakpoint
CREATE TABLE `fab_steps` (
	`id` int AUTO_INCREMENT NOT NULL,
	`chip_id` int NOT NULL,
	`kind` enum('resist','exposure','etch','deposition','lift_off','inspection','other') NOT NULL,
	`params` json NOT NULL,
	`operator_id` int NOT NULL,
	`performed_at` datetime(3) NOT NULL,
	`notes` text,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `fab_steps_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `files` (
	`id` int AUTO_INCREMENT NOT NULL,
	`sha256` varchar(64) NOT NULL,
	`original_name` varchar(255) NOT NULL,
	`mime` varchar(100) NOT NULL,
	`size_bytes` bigint NOT NULL,
	`kind` enum('sem','spectrum','sweep','camera','other') NOT NULL,
	`entity` varchar(20) NOT NULL,
	`entity_id` int NOT NULL,
	`uploaded_by` int NOT NULL,
	`uploaded_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`retired_at` datetime(3),
	CONSTRAINT `files_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `label_jobs` (
	`id` int AUTO_INCREMENT NOT NULL,
	`template` varchar(40) NOT NULL,
	`codes` json NOT NULL,
	`created_by` int NOT NULL,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `label_jobs_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `laser_setups` (
	`id` int AUTO_INCREMENT NOT NULL,
	`code` varchar(20) NOT NULL,
	`name` varchar(80) NOT NULL,
	`room` varchar(40) NOT NULL,
	`source_type` enum('cw','pulsed','mode_locked') NOT NULL,
	`wavelengths_nm` json NOT NULL,
	`notes` text,
	`retired_at` datetime(3),
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `laser_setups_id` PRIMARY KEY(`id`),
	CONSTRAINT `laser_setups_code_unique` UNIQUE(`code`)
);
--> statement-breakpoint
CREATE TABLE `locations` (
	`id` int AUTO_INCREMENT NOT NULL,
	`code` varchar(20) NOT NULL,
	`kind` enum('room','cabinet','box','slot') NOT NULL,
	`name` varchar(80) NOT NULL,
	`parent_id` int,
	`notes` varchar(500),
	`retired_at` datetime(3),
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `locations_id` PRIMARY KEY(`id`),
	CONSTRAINT `locations_code_unique` UNIQUE(`code`)
);
--> statement-breakpoint
CREATE TABLE `materials` (
	`id` int AUTO_INCREMENT NOT NULL,
	`name` varchar(80) NOT NULL,
	`formula` varchar(40) NOT NULL,
	`point_group` varchar(8) NOT NULL,
	`band_gap_ev` double,
	`transparency_note` varchar(300),
	`notes` text,
	`coefficients` json NOT NULL,
	`retired_at` datetime(3),
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `materials_id` PRIMARY KEY(`id`),
	CONSTRAINT `materials_name_unique` UNIQUE(`name`)
);
--> statement-breakpoint
CREATE TABLE `measurement_sessions` (
	`id` int AUTO_INCREMENT NOT NULL,
	`code` varchar(20) NOT NULL,
	`laser_setup_id` int NOT NULL,
	`operator_id` int NOT NULL,
	`performed_at` datetime(3) NOT NULL,
	`wavelength_nm` double NOT NULL,
	`pulse_duration_fs` double,
	`rep_rate_hz` double,
	`avg_power_mw` double NOT NULL,
	`spot_diameter_um` double,
	`objective_na` double,
	`pump` json NOT NULL,
	`harmonic_order` int NOT NULL,
	`geometry` enum('transmission','reflection') NOT NULL,
	`collection` enum('normal','angle_resolved') NOT NULL,
	`analyser` varchar(60),
	`detector` varchar(120),
	`integration_s` double,
	`filters` varchar(300),
	`notes` text,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `measurement_sessions_id` PRIMARY KEY(`id`),
	CONSTRAINT `measurement_sessions_code_unique` UNIQUE(`code`)
);
--> statement-breakpoint
CREATE TABLE `moves` (
	`id` int AUTO_INCREMENT NOT NULL,
	`item_kind` enum('wafer','chip','location') NOT NULL,
	`item_id` int NOT NULL,
	`item_code` varchar(24) NOT NULL,
	`from_location_id` int,
	`to_location_id` int,
	`handed_to_id` int,
	`moved_by` int NOT NULL,
	`moved_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`note` varchar(500),
	CONSTRAINT `moves_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `session_results` (
	`session_id` int NOT NULL,
	`array_id` int NOT NULL,
	`harmonic_power_w` double,
	`observed_normal` enum('not_checked','none','present','co','counter','linear') NOT NULL DEFAULT 'not_checked',
	`observed_m` json NOT NULL,
	`notes` varchar(1000),
	CONSTRAINT `session_results_session_id_array_id_pk` PRIMARY KEY(`session_id`,`array_id`)
);
--> statement-breakpoint
CREATE TABLE `wafers` (
	`id` int AUTO_INCREMENT NOT NULL,
	`code` varchar(20) NOT NULL,
	`material_id` int NOT NULL,
	`cut_normal` json NOT NULL,
	`flat_direction` json NOT NULL,
	`diameter_mm` double NOT NULL,
	`thickness_um` double NOT NULL,
	`lot` varchar(60) NOT NULL,
	`supplier` varchar(120),
	`received_on` date,
	`location_id` int,
	`status` enum('in_stock','in_process','used_up','retired') NOT NULL DEFAULT 'in_stock',
	`notes` text,
	`created_by` int NOT NULL,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `wafers_id` PRIMARY KEY(`id`),
	CONSTRAINT `wafers_code_unique` UNIQUE(`code`)
);
--> statement-breakpoint
ALTER TABLE `arrays` ADD CONSTRAINT `arrays_chip_id_chips_id_fk` FOREIGN KEY (`chip_id`) REFERENCES `chips`(`id`) ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `chips` ADD CONSTRAINT `chips_wafer_id_wafers_id_fk` FOREIGN KEY (`wafer_id`) REFERENCES `wafers`(`id`) ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `chips` ADD CONSTRAINT `chips_location_id_locations_id_fk` FOREIGN KEY (`location_id`) REFERENCES `locations`(`id`) ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `chips` ADD CONSTRAINT `chips_holder_id_users_id_fk` FOREIGN KEY (`holder_id`) REFERENCES `users`(`id`) ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `fab_steps` ADD CONSTRAINT `fab_steps_chip_id_chips_id_fk` FOREIGN KEY (`chip_id`) REFERENCES `chips`(`id`) ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `fab_steps` ADD CONSTRAINT `fab_steps_operator_id_users_id_fk` FOREIGN KEY (`operator_id`) REFERENCES `users`(`id`) ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `files` ADD CONSTRAINT `files_uploaded_by_users_id_fk` FOREIGN KEY (`uploaded_by`) REFERENCES `users`(`id`) ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `label_jobs` ADD CONSTRAINT `label_jobs_created_by_users_id_fk` FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `measurement_sessions` ADD CONSTRAINT `measurement_sessions_laser_setup_id_laser_setups_id_fk` FOREIGN KEY (`laser_setup_id`) REFERENCES `laser_setups`(`id`) ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `measurement_sessions` ADD CONSTRAINT `measurement_sessions_operator_id_users_id_fk` FOREIGN KEY (`operator_id`) REFERENCES `users`(`id`) ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `moves` ADD CONSTRAINT `moves_from_location_id_locations_id_fk` FOREIGN KEY (`from_location_id`) REFERENCES `locations`(`id`) ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `moves` ADD CONSTRAINT `moves_to_location_id_locations_id_fk` FOREIGN KEY (`to_location_id`) REFERENCES `locations`(`id`) ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `moves` ADD CONSTRAINT `moves_handed_to_id_users_id_fk` FOREIGN KEY (`handed_to_id`) REFERENCES `users`(`id`) ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `moves` ADD CONSTRAINT `moves_moved_by_users_id_fk` FOREIGN KEY (`moved_by`) REFERENCES `users`(`id`) ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `session_results` ADD CONSTRAINT `session_results_session_id_measurement_sessions_id_fk` FOREIGN KEY (`session_id`) REFERENCES `measurement_sessions`(`id`) ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `session_results` ADD CONSTRAINT `session_results_array_id_arrays_id_fk` FOREIGN KEY (`array_id`) REFERENCES `arrays`(`id`) ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `wafers` ADD CONSTRAINT `wafers_material_id_materials_id_fk` FOREIGN KEY (`material_id`) REFERENCES `materials`(`id`) ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `wafers` ADD CONSTRAINT `wafers_location_id_locations_id_fk` FOREIGN KEY (`location_id`) REFERENCES `locations`(`id`) ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `wafers` ADD CONSTRAINT `wafers_created_by_users_id_fk` FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `arrays_shape_idx` ON `arrays` (`shape`);--> statement-breakpoint
CREATE INDEX `arrays_engine_idx` ON `arrays` (`engine_version`);--> statement-breakpoint
CREATE INDEX `chips_status_idx` ON `chips` (`status`);--> statement-breakpoint
CREATE INDEX `chips_location_idx` ON `chips` (`location_id`);--> statement-breakpoint
CREATE INDEX `fab_steps_chip_idx` ON `fab_steps` (`chip_id`,`performed_at`);--> statement-breakpoint
CREATE INDEX `files_entity_idx` ON `files` (`entity`,`entity_id`);--> statement-breakpoint
CREATE INDEX `files_sha_idx` ON `files` (`sha256`);--> statement-breakpoint
CREATE INDEX `locations_parent_idx` ON `locations` (`parent_id`);--> statement-breakpoint
CREATE INDEX `sessions_performed_idx` ON `measurement_sessions` (`performed_at`);--> statement-breakpoint
CREATE INDEX `sessions_setup_idx` ON `measurement_sessions` (`laser_setup_id`);--> statement-breakpoint
CREATE INDEX `moves_item_idx` ON `moves` (`item_kind`,`item_id`);--> statement-breakpoint
CREATE INDEX `moves_to_idx` ON `moves` (`to_location_id`);--> statement-breakpoint
CREATE INDEX `session_results_array_idx` ON `session_results` (`array_id`);--> statement-breakpoint
CREATE INDEX `wafers_material_idx` ON `wafers` (`material_id`);--> statement-breakpoint
CREATE INDEX `wafers_status_idx` ON `wafers` (`status`);--> statement-breakpoint
CREATE INDEX `wafers_lot_idx` ON `wafers` (`lot`);