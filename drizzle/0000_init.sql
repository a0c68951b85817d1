CREATE TABLE `audit_log` (
	`id` varchar(32) NOT NULL,
	`workspace_id` varchar(32),
	`actor_id` varchar(32),
	`action` varchar(64) NOT NULL,
	`target_type` varchar(32) NOT NULL,
	`target_id` varchar(64) NOT NULL,
	`detail` json,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `audit_log_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `cells` (
	`id` varchar(32) NOT NULL,
	`workspace_id` varchar(32) NOT NULL,
	`notebook_id` varchar(32) NOT NULL,
	`kind` enum('notes','data','model','fit','compare') NOT NULL,
	`position` int NOT NULL,
	`source` mediumtext NOT NULL,
	`content` json,
	`version` int NOT NULL DEFAULT 1,
	`created_by` varchar(32),
	`updated_by` varchar(32),
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `cells_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `comments` (
	`id` varchar(32) NOT NULL,
	`workspace_id` varchar(32) NOT NULL,
	`notebook_id` varchar(32) NOT NULL,
	`cell_id` varchar(32) NOT NULL,
	`parent_id` varchar(32),
	`author_id` varchar(32),
	`body` text NOT NULL,
	`resolved` boolean NOT NULL DEFAULT false,
	`resolved_by` varchar(32),
	`resolved_at` datetime(3),
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `comments_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `datasets` (
	`id` varchar(32) NOT NULL,
	`workspace_id` varchar(32) NOT NULL,
	`notebook_id` varchar(32),
	`cell_id` varchar(32),
	`name` varchar(120) NOT NULL,
	`columns` json NOT NULL,
	`row_count` int NOT NULL,
	`bytes` int NOT NULL,
	`content` longblob NOT NULL,
	`created_by` varchar(32),
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `datasets_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `invitations` (
	`id` varchar(32) NOT NULL,
	`workspace_id` varchar(32) NOT NULL,
	`email` varchar(254) NOT NULL,
	`role` enum('owner','editor','reviewer','viewer') NOT NULL,
	`token_hash` char(64) NOT NULL,
	`invited_by` varchar(32),
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`expires_at` datetime(3) NOT NULL,
	`accepted_at` datetime(3),
	`accepted_by` varchar(32),
	`revoked_at` datetime(3),
	CONSTRAINT `invitations_id` PRIMARY KEY(`id`),
	CONSTRAINT `invitations_token_uq` UNIQUE(`token_hash`)
);
--> statement-breakpoint
CREATE TABLE `mail_outbox` (
	`id` varchar(32) NOT NULL,
	`from_address` varchar(320) NOT NULL,
	`to_addresses` json NOT NULL,
	`subject` varchar(500) NOT NULL,
	`text_body` mediumtext NOT NULL,
	`html_body` mediumtext,
	`raw` mediumtext NOT NULL,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `mail_outbox_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `memberships` (
	`workspace_id` varchar(32) NOT NULL,
	`user_id` varchar(32) NOT NULL,
	`role` enum('owner','editor','reviewer','viewer') NOT NULL,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `memberships_workspace_id_user_id_pk` PRIMARY KEY(`workspace_id`,`user_id`)
);
--> statement-breakpoint
CREATE TABLE `notebooks` (
	`id` varchar(32) NOT NULL,
	`workspace_id` varchar(32) NOT NULL,
	`title` varchar(160) NOT NULL,
	`created_by` varchar(32),
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `notebooks_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `password_resets` (
	`id` varchar(32) NOT NULL,
	`user_id` varchar(32) NOT NULL,
	`token_hash` char(64) NOT NULL,
	`expires_at` datetime(3) NOT NULL,
	`used_at` datetime(3),
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `password_resets_id` PRIMARY KEY(`id`),
	CONSTRAINT `password_resets_token_uq` UNIQUE(`token_hash`)
);
--> statement-breakpoint
CREATE TABLE `run_chains` (
	`id` varchar(32) NOT NULL,
	`workspace_id` varchar(32) NOT NULL,
	`run_id` varchar(32) NOT NULL,
	`chain_index` int NOT NULL,
	`draw_count` int NOT NULL,
	`dimension` int NOT NULL,
	`draws` longblob NOT NULL,
	`stats` json,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `run_chains_id` PRIMARY KEY(`id`),
	CONSTRAINT `run_chains_uq` UNIQUE(`run_id`,`chain_index`)
);
--> statement-breakpoint
CREATE TABLE `run_summaries` (
	`run_id` varchar(32) NOT NULL,
	`workspace_id` varchar(32) NOT NULL,
	`summary` json NOT NULL,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `run_summaries_run_id` PRIMARY KEY(`run_id`)
);
--> statement-breakpoint
CREATE TABLE `runs` (
	`id` varchar(32) NOT NULL,
	`workspace_id` varchar(32) NOT NULL,
	`notebook_id` varchar(32) NOT NULL,
	`cell_id` varchar(32),
	`status` enum('queued','running','done','failed','cancelled') NOT NULL DEFAULT 'queued',
	`settings` json NOT NULL,
	`seed` int NOT NULL,
	`model_hash` char(64) NOT NULL,
	`spec` json,
	`progress` json,
	`lease_owner` varchar(120),
	`lease_expires_at` datetime(3),
	`attempts` int NOT NULL DEFAULT 0,
	`requested_by` varchar(32),
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`started_at` datetime(3),
	`finished_at` datetime(3),
	`timings` json,
	`error` text,
	CONSTRAINT `runs_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `sessions` (
	`id` varchar(255) NOT NULL,
	`user_id` varchar(32) NOT NULL,
	`expires_at` datetime NOT NULL,
	CONSTRAINT `sessions_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `share_links` (
	`id` varchar(32) NOT NULL,
	`workspace_id` varchar(32) NOT NULL,
	`notebook_id` varchar(32) NOT NULL,
	`token_hash` char(64) NOT NULL,
	`created_by` varchar(32),
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`expires_at` datetime(3),
	`revoked_at` datetime(3),
	CONSTRAINT `share_links_id` PRIMARY KEY(`id`),
	CONSTRAINT `share_links_token_uq` UNIQUE(`token_hash`)
);
--> statement-breakpoint
CREATE TABLE `users` (
	`id` varchar(32) NOT NULL,
	`email` varchar(254) NOT NULL,
	`name` varchar(120) NOT NULL,
	`password_hash` varchar(255) NOT NULL,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `users_id` PRIMARY KEY(`id`),
	CONSTRAINT `users_email_uq` UNIQUE(`email`)
);
--> statement-breakpoint
CREATE TABLE `workspaces` (
	`id` varchar(32) NOT NULL,
	`name` varchar(120) NOT NULL,
	`created_by` varchar(32),
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `workspaces_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
ALTER TABLE `cells` ADD CONSTRAINT `cells_workspace_id_workspaces_id_fk` FOREIGN KEY (`workspace_id`) REFERENCES `workspaces`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `cells` ADD CONSTRAINT `cells_notebook_id_notebooks_id_fk` FOREIGN KEY (`notebook_id`) REFERENCES `notebooks`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `cells` ADD CONSTRAINT `cells_created_by_users_id_fk` FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `cells` ADD CONSTRAINT `cells_updated_by_users_id_fk` FOREIGN KEY (`updated_by`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `comments` ADD CONSTRAINT `comments_workspace_id_workspaces_id_fk` FOREIGN KEY (`workspace_id`) REFERENCES `workspaces`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `comments` ADD CONSTRAINT `comments_notebook_id_notebooks_id_fk` FOREIGN KEY (`notebook_id`) REFERENCES `notebooks`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `comments` ADD CONSTRAINT `comments_cell_id_cells_id_fk` FOREIGN KEY (`cell_id`) REFERENCES `cells`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `comments` ADD CONSTRAINT `comments_author_id_users_id_fk` FOREIGN KEY (`author_id`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `comments` ADD CONSTRAINT `comments_resolved_by_users_id_fk` FOREIGN KEY (`resolved_by`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `datasets` ADD CONSTRAINT `datasets_workspace_id_workspaces_id_fk` FOREIGN KEY (`workspace_id`) REFERENCES `workspaces`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `datasets` ADD CONSTRAINT `datasets_notebook_id_notebooks_id_fk` FOREIGN KEY (`notebook_id`) REFERENCES `notebooks`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `datasets` ADD CONSTRAINT `datasets_cell_id_cells_id_fk` FOREIGN KEY (`cell_id`) REFERENCES `cells`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `datasets` ADD CONSTRAINT `datasets_created_by_users_id_fk` FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `invitations` ADD CONSTRAINT `invitations_workspace_id_workspaces_id_fk` FOREIGN KEY (`workspace_id`) REFERENCES `workspaces`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `invitations` ADD CONSTRAINT `invitations_invited_by_users_id_fk` FOREIGN KEY (`invited_by`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `invitations` ADD CONSTRAINT `invitations_accepted_by_users_id_fk` FOREIGN KEY (`accepted_by`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `memberships` ADD CONSTRAINT `memberships_workspace_id_workspaces_id_fk` FOREIGN KEY (`workspace_id`) REFERENCES `workspaces`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `memberships` ADD CONSTRAINT `memberships_user_id_users_id_fk` FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `notebooks` ADD CONSTRAINT `notebooks_workspace_id_workspaces_id_fk` FOREIGN KEY (`workspace_id`) REFERENCES `workspaces`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `notebooks` ADD CONSTRAINT `notebooks_created_by_users_id_fk` FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `password_resets` ADD CONSTRAINT `password_resets_user_id_users_id_fk` FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `run_chains` ADD CONSTRAINT `run_chains_workspace_id_workspaces_id_fk` FOREIGN KEY (`workspace_id`) REFERENCES `workspaces`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `run_chains` ADD CONSTRAINT `run_chains_run_id_runs_id_fk` FOREIGN KEY (`run_id`) REFERENCES `runs`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `run_summaries` ADD CONSTRAINT `run_summaries_run_id_runs_id_fk` FOREIGN KEY (`run_id`) REFERENCES `runs`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `run_summaries` ADD CONSTRAINT `run_summaries_workspace_id_workspaces_id_fk` FOREIGN KEY (`workspace_id`) REFERENCES `workspaces`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `runs` ADD CONSTRAINT `runs_workspace_id_workspaces_id_fk` FOREIGN KEY (`workspace_id`) REFERENCES `workspaces`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `runs` ADD CONSTRAINT `runs_notebook_id_notebooks_id_fk` FOREIGN KEY (`notebook_id`) REFERENCES `notebooks`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `runs` ADD CONSTRAINT `runs_cell_id_cells_id_fk` FOREIGN KEY (`cell_id`) REFERENCES `cells`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `runs` ADD CONSTRAINT `runs_requested_by_users_id_fk` FOREIGN KEY (`requested_by`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `sessions` ADD CONSTRAINT `sessions_user_id_users_id_fk` FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `share_links` ADD CONSTRAINT `share_links_workspace_id_workspaces_id_fk` FOREIGN KEY (`workspace_id`) REFERENCES `workspaces`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `share_links` ADD CONSTRAINT `share_links_notebook_id_notebooks_id_fk` FOREIGN KEY (`notebook_id`) REFERENCES `notebooks`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `share_links` ADD CONSTRAINT `share_links_created_by_users_id_fk` FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `workspaces` ADD CONSTRAINT `workspaces_created_by_users_id_fk` FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `audit_ws_idx` ON `audit_log` (`workspace_id`,`created_at`);--> statement-breakpoint
CREATE INDEX `cells_notebook_idx` ON `cells` (`workspace_id`,`notebook_id`,`position`);--> statement-breakpoint
CREATE INDEX `comments_cell_idx` ON `comments` (`workspace_id`,`notebook_id`,`cell_id`);--> statement-breakpoint
CREATE INDEX `datasets_ws_idx` ON `datasets` (`workspace_id`,`notebook_id`);--> statement-breakpoint
CREATE INDEX `invitations_ws_idx` ON `invitations` (`workspace_id`);--> statement-breakpoint
CREATE INDEX `memberships_user_idx` ON `memberships` (`user_id`);--> statement-breakpoint
CREATE INDEX `notebooks_ws_idx` ON `notebooks` (`workspace_id`,`updated_at`);--> statement-breakpoint
CREATE INDEX `password_resets_user_idx` ON `password_resets` (`user_id`);--> statement-breakpoint
CREATE INDEX `run_chains_ws_idx` ON `run_chains` (`workspace_id`);--> statement-breakpoint
CREATE INDEX `run_summaries_ws_idx` ON `run_summaries` (`workspace_id`);--> statement-breakpoint
CREATE INDEX `runs_queue_idx` ON `runs` (`status`,`lease_expires_at`);--> statement-breakpoint
CREATE INDEX `runs_ws_idx` ON `runs` (`workspace_id`,`notebook_id`,`created_at`);--> statement-breakpoint
CREATE INDEX `sessions_user_idx` ON `sessions` (`user_id`);--> statement-breakpoint
CREATE INDEX `share_links_nb_idx` ON `share_links` (`workspace_id`,`notebook_id`);