CREATE INDEX `fab_steps_performed_idx` ON `fab_steps` (`performed_at`);--> statement-breakpoint
CREATE INDEX `sessions_operator_performed_idx` ON `measurement_sessions` (`operator_id`,`performed_at`);