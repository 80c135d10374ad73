CREATE TABLE `pulse_chunks` (
	`run_id` text NOT NULL,
	`chunk_index` integer NOT NULL,
	`replicate_start` integer NOT NULL,
	`pulse_count` integer NOT NULL,
	`data` blob NOT NULL,
	PRIMARY KEY(`run_id`, `chunk_index`),
	FOREIGN KEY (`run_id`) REFERENCES `runs`(`id`) ON UPDATE no action ON DELETE cascade
);
