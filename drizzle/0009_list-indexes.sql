DROP INDEX `arrays_shape_idx` ON `arrays`;--> statement-breakpoint
DROP INDEX `arrays_shape_lattice_idx` ON `arrays`;--> statement-breakpoint
CREATE INDEX `arrays_shape_lattice_code_idx` ON `arrays` (`shape`,`lattice`,`retired_at`,`code`);--> statement-breakpoint
CREATE INDEX `arrays_shape_lattice_period_idx` ON `arrays` (`shape`,`lattice`,`retired_at`,`period_x_nm`);--> statement-breakpoint
-- Search boxes of the big lists (server/services/text-search.ts): word-prefix search of notes.
-- Drizzle's schema cannot declare these, so they live only here.
CREATE FULLTEXT INDEX `arrays_notes_ft` ON `arrays` (`notes`);--> statement-breakpoint
CREATE FULLTEXT INDEX `chips_notes_ft` ON `chips` (`notes`);--> statement-breakpoint
CREATE FULLTEXT INDEX `sessions_text_ft` ON `measurement_sessions` (`notes`, `detector`);
