CREATE TABLE `measured_lots` (
	`id` text PRIMARY KEY NOT NULL,
	`workspace_id` text NOT NULL,
	`program_id` text NOT NULL,
	`revision_id` text NOT NULL,
	`run_id` text NOT NULL,
	`run_date` text NOT NULL,
	`chamber` text DEFAULT '' NOT NULL,
	`notes` text DEFAULT '' NOT NULL,
	`guard_k` real NOT NULL,
	`created_by` text,
	`created_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	FOREIGN KEY (`workspace_id`) REFERENCES `workspaces`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`program_id`) REFERENCES `programs`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`revision_id`) REFERENCES `revisions`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE set null
);
--> statement-breakpoint
CREATE INDEX `measured_lots_program_idx` ON `measured_lots` (`program_id`);--> statement-breakpoint
CREATE INDEX `measured_lots_revision_idx` ON `measured_lots` (`revision_id`);--> statement-breakpoint
CREATE TABLE `measured_parts` (
	`id` text PRIMARY KEY NOT NULL,
	`lot_id` text NOT NULL,
	`label` text NOT NULL,
	`measurements` text NOT NULL,
	`status` text NOT NULL,
	`verdict` text NOT NULL,
	`fit` text,
	`fitted_at` integer,
	`created_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	FOREIGN KEY (`lot_id`) REFERENCES `measured_lots`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE UNIQUE INDEX `measured_parts_lot_label_unique` ON `measured_parts` (`lot_id`,`label`);