CREATE INDEX `arrays_retired_code_idx` ON `arrays` (`retired_at`,`code`);--> statement-breakpoint
CREATE INDEX `arrays_shape_lattice_idx` ON `arrays` (`shape`,`lattice`,`retired_at`);--> statement-breakpoint
CREATE INDEX `chips_status_code_idx` ON `chips` (`status`,`code`);