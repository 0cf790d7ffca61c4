CREATE TABLE `program_versions` (
	`id` text PRIMARY KEY NOT NULL,
	`program_id` text NOT NULL,
	`version` integer NOT NULL,
	`target_yield` real NOT NULL,
	`min_evidence_trials` integer NOT NULL,
	`confidence` real NOT NULL,
	`spec_mask` text NOT NULL,
	`error_model` text NOT NULL,
	`changes` text NOT NULL,
	`changed_by` text,
	`note` text DEFAULT '' NOT NULL,
	`created_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	FOREIGN KEY (`program_id`) REFERENCES `programs`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`changed_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE set null
);
--> statement-breakpoint
CREATE UNIQUE INDEX `program_versions_program_version_unique` ON `program_versions` (`program_id`,`version`);--> statement-breakpoint
CREATE TABLE `spec_deviations` (
	`id` text PRIMARY KEY NOT NULL,
	`revision_id` text NOT NULL,
	`program_version` integer NOT NULL,
	`program_mask_hash` text NOT NULL,
	`bands` text NOT NULL,
	`reason` text NOT NULL,
	`requested_by` text NOT NULL,
	`requested_at` integer NOT NULL,
	`status` text DEFAULT 'pending' NOT NULL,
	`decided_by` text,
	`decided_at` integer,
	`decision_note` text DEFAULT '' NOT NULL,
	FOREIGN KEY (`revision_id`) REFERENCES `revisions`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`requested_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`decided_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE INDEX `spec_deviations_revision_idx` ON `spec_deviations` (`revision_id`);--> statement-breakpoint
ALTER TABLE `decisions` ADD `program_version` integer;--> statement-breakpoint
ALTER TABLE `programs` ADD `min_evidence_trials` integer DEFAULT 2000 NOT NULL;--> statement-breakpoint
ALTER TABLE `programs` ADD `confidence` real DEFAULT 0.95 NOT NULL;--> statement-breakpoint
ALTER TABLE `programs` ADD `version` integer DEFAULT 1 NOT NULL;--> statement-breakpoint
ALTER TABLE `yield_runs` ADD `kind` text DEFAULT 'what_if' NOT NULL;--> statement-breakpoint
ALTER TABLE `yield_runs` ADD `program_version` integer;--> statement-breakpoint
-- Existing programs start at version 1 with the default evidence rules (2,000 trials, 95 % confidence); runs made
-- before this migration are what-if studies (none has a server-assigned seed).
INSERT INTO `program_versions` (`id`, `program_id`, `version`, `target_yield`, `min_evidence_trials`, `confidence`, `spec_mask`, `error_model`, `changes`, `changed_by`, `note`, `created_at`)
SELECT lower(hex(randomblob(16))), `id`, 1, `target_yield`, `min_evidence_trials`, `confidence`, `spec_mask`, `error_model`, '{}', NULL, 'evidence rules introduced with the defaults', `created_at` FROM `programs`;
