CREATE TABLE `regime_maps` (
	`id` text PRIMARY KEY NOT NULL,
	`lab_id` text NOT NULL,
	`name` text NOT NULL,
	`base_spec` text NOT NULL,
	`axes` text NOT NULL,
	`points` text NOT NULL,
	`compute_seconds` real DEFAULT 0 NOT NULL,
	`created_by` text,
	`created_at` integer NOT NULL,
	FOREIGN KEY (`lab_id`) REFERENCES `labs`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
ALTER TABLE `runs` ADD `replicate_figures` text;--> statement-breakpoint
ALTER TABLE `sweeps` ADD `refined_points` text;