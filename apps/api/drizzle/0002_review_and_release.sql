CREATE TABLE `comments` (
	`id` text PRIMARY KEY NOT NULL,
	`thread_id` text NOT NULL,
	`author_id` text NOT NULL,
	`body` text NOT NULL,
	`mentions` text NOT NULL,
	`created_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	FOREIGN KEY (`thread_id`) REFERENCES `threads`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`author_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE INDEX `comments_thread_idx` ON `comments` (`thread_id`);--> statement-breakpoint
CREATE TABLE `decisions` (
	`id` text PRIMARY KEY NOT NULL,
	`revision_id` text NOT NULL,
	`action` text NOT NULL,
	`from_status` text NOT NULL,
	`to_status` text NOT NULL,
	`actor_id` text NOT NULL,
	`actor_name` text NOT NULL,
	`revision_hash` text NOT NULL,
	`yield_run_id` text,
	`note` text DEFAULT '' NOT NULL,
	`at` integer NOT NULL,
	FOREIGN KEY (`revision_id`) REFERENCES `revisions`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`actor_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`yield_run_id`) REFERENCES `yield_runs`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE INDEX `decisions_revision_idx` ON `decisions` (`revision_id`);--> statement-breakpoint
CREATE TABLE `designs` (
	`id` text PRIMARY KEY NOT NULL,
	`program_id` text NOT NULL,
	`name` text NOT NULL,
	`created_by` text,
	`created_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	FOREIGN KEY (`program_id`) REFERENCES `programs`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE set null
);
--> statement-breakpoint
CREATE INDEX `designs_program_idx` ON `designs` (`program_id`);--> statement-breakpoint
CREATE TABLE `materials` (
	`id` text PRIMARY KEY NOT NULL,
	`workspace_id` text NOT NULL,
	`material_id` text NOT NULL,
	`name` text NOT NULL,
	`role` text NOT NULL,
	`source` text NOT NULL,
	`model` text NOT NULL,
	`created_by` text,
	`created_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	FOREIGN KEY (`workspace_id`) REFERENCES `workspaces`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE set null
);
--> statement-breakpoint
CREATE UNIQUE INDEX `materials_workspace_material_unique` ON `materials` (`workspace_id`,`material_id`);--> statement-breakpoint
CREATE TABLE `measurements` (
	`id` text PRIMARY KEY NOT NULL,
	`revision_id` text NOT NULL,
	`label` text NOT NULL,
	`quantity` text NOT NULL,
	`angle_deg` real NOT NULL,
	`polarization` text NOT NULL,
	`wavelengths` text NOT NULL,
	`values` text NOT NULL,
	`created_by` text,
	`created_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	FOREIGN KEY (`revision_id`) REFERENCES `revisions`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE set null
);
--> statement-breakpoint
CREATE INDEX `measurements_revision_idx` ON `measurements` (`revision_id`);--> statement-breakpoint
CREATE TABLE `programs` (
	`id` text PRIMARY KEY NOT NULL,
	`workspace_id` text NOT NULL,
	`name` text NOT NULL,
	`customer` text DEFAULT '' NOT NULL,
	`description` text DEFAULT '' NOT NULL,
	`application` text DEFAULT '' NOT NULL,
	`protective` integer DEFAULT false NOT NULL,
	`target_yield` real NOT NULL,
	`spec_mask` text NOT NULL,
	`error_model` text NOT NULL,
	`study_defaults` text NOT NULL,
	`created_by` text,
	`created_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	FOREIGN KEY (`workspace_id`) REFERENCES `workspaces`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE set null
);
--> statement-breakpoint
CREATE INDEX `programs_workspace_idx` ON `programs` (`workspace_id`);--> statement-breakpoint
CREATE TABLE `releases` (
	`id` text PRIMARY KEY NOT NULL,
	`workspace_id` text NOT NULL,
	`revision_id` text NOT NULL,
	`design_id` text NOT NULL,
	`program_id` text NOT NULL,
	`yield_run_id` text NOT NULL,
	`released_by` text NOT NULL,
	`released_at` integer NOT NULL,
	`snapshot` text NOT NULL,
	FOREIGN KEY (`workspace_id`) REFERENCES `workspaces`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`revision_id`) REFERENCES `revisions`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`design_id`) REFERENCES `designs`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`program_id`) REFERENCES `programs`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`yield_run_id`) REFERENCES `yield_runs`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`released_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE UNIQUE INDEX `releases_revision_id_unique` ON `releases` (`revision_id`);--> statement-breakpoint
CREATE INDEX `releases_workspace_idx` ON `releases` (`workspace_id`);--> statement-breakpoint
CREATE TABLE `revisions` (
	`id` text PRIMARY KEY NOT NULL,
	`design_id` text NOT NULL,
	`number` integer NOT NULL,
	`stack` text NOT NULL,
	`spec_mask` text NOT NULL,
	`note` text DEFAULT '' NOT NULL,
	`author_id` text NOT NULL,
	`hash` text NOT NULL,
	`status` text DEFAULT 'draft' NOT NULL,
	`status_changed_at` integer,
	`created_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	FOREIGN KEY (`design_id`) REFERENCES `designs`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`author_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE UNIQUE INDEX `revisions_design_number_unique` ON `revisions` (`design_id`,`number`);--> statement-breakpoint
CREATE INDEX `revisions_status_idx` ON `revisions` (`status`);--> statement-breakpoint
CREATE TABLE `threads` (
	`id` text PRIMARY KEY NOT NULL,
	`design_id` text NOT NULL,
	`revision_id` text NOT NULL,
	`revision_number` integer NOT NULL,
	`anchor` text NOT NULL,
	`severity` text NOT NULL,
	`status` text DEFAULT 'open' NOT NULL,
	`author_id` text NOT NULL,
	`resolved_by` text,
	`resolved_at` integer,
	`created_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	FOREIGN KEY (`design_id`) REFERENCES `designs`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`revision_id`) REFERENCES `revisions`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`author_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`resolved_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE set null
);
--> statement-breakpoint
CREATE INDEX `threads_design_idx` ON `threads` (`design_id`);--> statement-breakpoint
CREATE TABLE `yield_chunks` (
	`run_id` text NOT NULL,
	`start_trial` integer NOT NULL,
	`count` integer NOT NULL,
	`data` text NOT NULL,
	FOREIGN KEY (`run_id`) REFERENCES `yield_runs`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE UNIQUE INDEX `yield_chunks_run_start_unique` ON `yield_chunks` (`run_id`,`start_trial`);--> statement-breakpoint
CREATE TABLE `yield_runs` (
	`id` text PRIMARY KEY NOT NULL,
	`revision_id` text NOT NULL,
	`requested_by` text,
	`status` text DEFAULT 'queued' NOT NULL,
	`progress_done` integer DEFAULT 0 NOT NULL,
	`trials` integer NOT NULL,
	`seed` text NOT NULL,
	`error_model` text NOT NULL,
	`client_result` text,
	`result` text,
	`verified` integer,
	`mismatch` text,
	`engine_version` text NOT NULL,
	`error` text,
	`created_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	`started_at` integer,
	`finished_at` integer,
	FOREIGN KEY (`revision_id`) REFERENCES `revisions`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`requested_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE set null
);
--> statement-breakpoint
CREATE INDEX `yield_runs_revision_idx` ON `yield_runs` (`revision_id`);--> statement-breakpoint
CREATE INDEX `yield_runs_status_idx` ON `yield_runs` (`status`);