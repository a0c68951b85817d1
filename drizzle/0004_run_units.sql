CREATE TABLE `run_units` (
	`id` varchar(32) NOT NULL,
	`workspace_id` varchar(32) NOT NULL,
	`run_id` varchar(32) NOT NULL,
	`unit` int NOT NULL,
	`kind` enum('chain','finish','job') NOT NULL,
	`status` enum('queued','running','done','dropped') NOT NULL DEFAULT 'queued',
	`lease_owner` varchar(120),
	`lease_expires_at` datetime(3),
	`heartbeat_at` datetime(3),
	`attempts` int NOT NULL DEFAULT 0,
	`progress` json,
	`queued_at` datetime(3) NOT NULL,
	`claimed_at` datetime(3),
	`finished_at` datetime(3),
	CONSTRAINT `run_units_id` PRIMARY KEY(`id`),
	CONSTRAINT `run_units_uq` UNIQUE(`run_id`,`unit`)
);
--> statement-breakpoint
ALTER TABLE `runs` ADD `plan` json;--> statement-breakpoint
ALTER TABLE `run_units` ADD CONSTRAINT `run_units_workspace_id_workspaces_id_fk` FOREIGN KEY (`workspace_id`) REFERENCES `workspaces`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `run_units` ADD CONSTRAINT `run_units_run_id_runs_id_fk` FOREIGN KEY (`run_id`) REFERENCES `runs`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `run_units_queue_idx` ON `run_units` (`status`,`lease_expires_at`);--> statement-breakpoint
CREATE INDEX `run_units_ws_idx` ON `run_units` (`workspace_id`,`claimed_at`);