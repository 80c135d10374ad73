ALTER TABLE `runs` ADD `regime` text;--> statement-breakpoint
ALTER TABLE `runs` ADD `regime_deterministic` text;--> statement-breakpoint
ALTER TABLE `runs` ADD `regime_stochastic` text;