CREATE TABLE `pending_sign_ups` (
	`id` varchar(32) NOT NULL,
	`email` varchar(254) NOT NULL,
	`name` varchar(120) NOT NULL,
	`password_hash` varchar(255) NOT NULL,
	`token_hash` char(64) NOT NULL,
	`expires_at` datetime(3) NOT NULL,
	`used_at` datetime(3),
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `pending_sign_ups_id` PRIMARY KEY(`id`),
	CONSTRAINT `pending_sign_ups_token_uq` UNIQUE(`token_hash`)
);
--> statement-breakpoint
CREATE INDEX `pending_sign_ups_email_idx` ON `pending_sign_ups` (`email`);