CREATE TABLE `app_settings` (
	`key` text PRIMARY KEY NOT NULL,
	`value` text NOT NULL
);
--> statement-breakpoint
CREATE TABLE `audit_events` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`lab_id` text,
	`user_id` text,
	`action` text NOT NULL,
	`target_type` text,
	`target_id` text,
	`detail` text,
	`at` integer NOT NULL
);
--> statement-breakpoint
CREATE INDEX `audit_lab_idx` ON `audit_events` (`lab_id`,`at`);--> statement-breakpoint
CREATE TABLE `circuit_versions` (
	`circuit_id` text NOT NULL,
	`version` integer NOT NULL,
	`body` text NOT NULL,
	`note` text,
	`created_by` text,
	`created_at` integer NOT NULL,
	PRIMARY KEY(`circuit_id`, `version`),
	FOREIGN KEY (`circuit_id`) REFERENCES `circuits`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE TABLE `circuits` (
	`id` text PRIMARY KEY NOT NULL,
	`lab_id` text NOT NULL,
	`name` text NOT NULL,
	`current_version` integer DEFAULT 1 NOT NULL,
	`created_by` text,
	`created_at` integer NOT NULL,
	`updated_at` integer NOT NULL,
	`archived_at` integer,
	`demo_key` text,
	FOREIGN KEY (`lab_id`) REFERENCES `labs`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE INDEX `circuits_lab_idx` ON `circuits` (`lab_id`);--> statement-breakpoint
CREATE UNIQUE INDEX `circuits_demo_key_idx` ON `circuits` (`lab_id`,`demo_key`);--> statement-breakpoint
CREATE TABLE `input_programs` (
	`id` text PRIMARY KEY NOT NULL,
	`lab_id` text NOT NULL,
	`name` text NOT NULL,
	`body` text NOT NULL,
	`created_by` text,
	`created_at` integer NOT NULL,
	`updated_at` integer NOT NULL,
	`archived_at` integer,
	`demo_key` text,
	FOREIGN KEY (`lab_id`) REFERENCES `labs`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE INDEX `programs_lab_idx` ON `input_programs` (`lab_id`);--> statement-breakpoint
CREATE UNIQUE INDEX `programs_demo_key_idx` ON `input_programs` (`lab_id`,`demo_key`);--> statement-breakpoint
CREATE TABLE `labs` (
	`id` text PRIMARY KEY NOT NULL,
	`name` text NOT NULL,
	`demo_key` text,
	`created_at` integer NOT NULL
);
--> statement-breakpoint
CREATE UNIQUE INDEX `labs_demo_key_idx` ON `labs` (`demo_key`);--> statement-breakpoint
CREATE TABLE `matches` (
	`id` text PRIMARY KEY NOT NULL,
	`lab_id` text NOT NULL,
	`trace_set_id` text NOT NULL,
	`run_id` text,
	`sweep_id` text,
	`tolerance` real NOT NULL,
	`result` text NOT NULL,
	`created_by` text,
	`created_at` integer NOT NULL,
	FOREIGN KEY (`lab_id`) REFERENCES `labs`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`trace_set_id`) REFERENCES `trace_sets`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE TABLE `memberships` (
	`lab_id` text NOT NULL,
	`user_id` text NOT NULL,
	`role` text NOT NULL,
	`created_at` integer NOT NULL,
	PRIMARY KEY(`lab_id`, `user_id`),
	FOREIGN KEY (`lab_id`) REFERENCES `labs`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE INDEX `memberships_user_idx` ON `memberships` (`user_id`);--> statement-breakpoint
CREATE TABLE `outbox` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`to` text NOT NULL,
	`from` text NOT NULL,
	`subject` text NOT NULL,
	`text` text NOT NULL,
	`created_at` integer NOT NULL
);
--> statement-breakpoint
CREATE TABLE `pulse_stats` (
	`run_id` text NOT NULL,
	`replicate` integer NOT NULL,
	`pulse_index` integer NOT NULL,
	`on` real NOT NULL,
	`off` real NOT NULL,
	`duration_bin` real NOT NULL,
	`excluded` integer NOT NULL,
	`passed` integer NOT NULL,
	`delay` real,
	`off_delay` real,
	`width` real,
	`widths` text,
	`peak` real NOT NULL,
	`time_to_peak` real NOT NULL,
	`fwhm` real,
	`baseline` real NOT NULL,
	PRIMARY KEY(`run_id`, `replicate`, `pulse_index`),
	FOREIGN KEY (`run_id`) REFERENCES `runs`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE INDEX `pulse_stats_duration_idx` ON `pulse_stats` (`run_id`,`duration_bin`);--> statement-breakpoint
CREATE TABLE `replicate_stats` (
	`run_id` text NOT NULL,
	`replicate` integer NOT NULL,
	`events` integer NOT NULL,
	`capped` integer NOT NULL,
	`output_mean` real,
	`output_var` real,
	`factors` text,
	PRIMARY KEY(`run_id`, `replicate`),
	FOREIGN KEY (`run_id`) REFERENCES `runs`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE TABLE `run_chunks` (
	`run_id` text NOT NULL,
	`chunk_index` integer NOT NULL,
	`replicate_start` integer NOT NULL,
	`count` integer NOT NULL,
	`events` integer NOT NULL,
	`grid_sum` blob,
	`grid_sum_sq` blob,
	`grid_count` blob,
	`seconds` real NOT NULL,
	PRIMARY KEY(`run_id`, `chunk_index`),
	FOREIGN KEY (`run_id`) REFERENCES `runs`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE TABLE `run_series` (
	`run_id` text NOT NULL,
	`species` text NOT NULL,
	`kind` text NOT NULL,
	`values` blob NOT NULL,
	PRIMARY KEY(`run_id`, `species`, `kind`),
	FOREIGN KEY (`run_id`) REFERENCES `runs`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE TABLE `run_trajectories` (
	`run_id` text NOT NULL,
	`replicate` integer NOT NULL,
	`species` text NOT NULL,
	`values` blob NOT NULL,
	PRIMARY KEY(`run_id`, `replicate`, `species`),
	FOREIGN KEY (`run_id`) REFERENCES `runs`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE TABLE `runs` (
	`id` text PRIMARY KEY NOT NULL,
	`lab_id` text NOT NULL,
	`name` text NOT NULL,
	`notes` text DEFAULT '' NOT NULL,
	`status` text NOT NULL,
	`status_reason` text,
	`spec` text NOT NULL,
	`seed` text NOT NULL,
	`replicates` integer NOT NULL,
	`chunk_size` integer NOT NULL,
	`engine_version` text NOT NULL,
	`circuit_id` text,
	`circuit_version` integer,
	`program_id` text,
	`sweep_id` text,
	`sweep_point` integer,
	`control_of` text,
	`reproduce_of` text,
	`expected_stats_hash` text,
	`expected_engine_version` text,
	`replicates_done` integer DEFAULT 0 NOT NULL,
	`events_total` integer DEFAULT 0 NOT NULL,
	`capped_replicates` integer DEFAULT 0 NOT NULL,
	`compute_seconds` real DEFAULT 0 NOT NULL,
	`summary` text,
	`stats_hash` text,
	`created_by` text,
	`created_at` integer NOT NULL,
	`started_at` integer,
	`finished_at` integer,
	`archived_at` integer,
	`deleted_at` integer,
	`demo_key` text,
	FOREIGN KEY (`lab_id`) REFERENCES `labs`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE INDEX `runs_lab_idx` ON `runs` (`lab_id`,`created_at`);--> statement-breakpoint
CREATE INDEX `runs_status_idx` ON `runs` (`status`);--> statement-breakpoint
CREATE INDEX `runs_sweep_idx` ON `runs` (`sweep_id`,`sweep_point`);--> statement-breakpoint
CREATE UNIQUE INDEX `runs_demo_key_idx` ON `runs` (`lab_id`,`demo_key`);--> statement-breakpoint
CREATE TABLE `sessions` (
	`sid` text PRIMARY KEY NOT NULL,
	`data` text NOT NULL,
	`expires_at` integer NOT NULL
);
--> statement-breakpoint
CREATE INDEX `sessions_expires_idx` ON `sessions` (`expires_at`);--> statement-breakpoint
CREATE TABLE `sweeps` (
	`id` text PRIMARY KEY NOT NULL,
	`lab_id` text NOT NULL,
	`name` text NOT NULL,
	`base_spec` text NOT NULL,
	`axes` text NOT NULL,
	`status` text NOT NULL,
	`status_reason` text,
	`point_count` integer NOT NULL,
	`created_by` text,
	`created_at` integer NOT NULL,
	`finished_at` integer,
	`archived_at` integer,
	`deleted_at` integer,
	FOREIGN KEY (`lab_id`) REFERENCES `labs`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE TABLE `tokens` (
	`token_hash` text PRIMARY KEY NOT NULL,
	`purpose` text NOT NULL,
	`user_id` text,
	`lab_id` text,
	`email` text,
	`role` text,
	`created_by` text,
	`expires_at` integer NOT NULL,
	`used_at` integer,
	`created_at` integer NOT NULL,
	FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`lab_id`) REFERENCES `labs`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE TABLE `trace_cells` (
	`trace_set_id` text NOT NULL,
	`cell` text NOT NULL,
	`times` blob NOT NULL,
	`values` blob NOT NULL,
	PRIMARY KEY(`trace_set_id`, `cell`),
	FOREIGN KEY (`trace_set_id`) REFERENCES `trace_sets`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE TABLE `trace_sets` (
	`id` text PRIMARY KEY NOT NULL,
	`lab_id` text NOT NULL,
	`name` text NOT NULL,
	`synthetic` integer DEFAULT false NOT NULL,
	`file_name` text,
	`layout` text NOT NULL,
	`time_unit` text NOT NULL,
	`schedule` text NOT NULL,
	`settings` text NOT NULL,
	`cell_count` integer NOT NULL,
	`uploaded_by` text,
	`created_at` integer NOT NULL,
	`deleted_at` integer,
	`demo_key` text,
	FOREIGN KEY (`lab_id`) REFERENCES `labs`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE INDEX `trace_sets_lab_idx` ON `trace_sets` (`lab_id`);--> statement-breakpoint
CREATE UNIQUE INDEX `trace_sets_demo_key_idx` ON `trace_sets` (`lab_id`,`demo_key`);--> statement-breakpoint
CREATE TABLE `users` (
	`id` text PRIMARY KEY NOT NULL,
	`email` text NOT NULL,
	`display_name` text NOT NULL,
	`password_hash` text,
	`is_site_admin` integer DEFAULT false NOT NULL,
	`notify_on_run_end` integer DEFAULT true NOT NULL,
	`created_at` integer NOT NULL
);
--> statement-breakpoint
CREATE UNIQUE INDEX `users_email_idx` ON `users` (`email`);