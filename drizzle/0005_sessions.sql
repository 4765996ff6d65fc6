CREATE TABLE `recovery_codes` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`user_id` bigint unsigned NOT NULL,
	`code_hash` varchar(64) NOT NULL,
	`used_at` datetime(3),
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `recovery_codes_id` PRIMARY KEY(`id`),
	CONSTRAINT `recovery_codes_hash_uq` UNIQUE(`user_id`,`code_hash`)
);
--> statement-breakpoint
CREATE TABLE `user_sessions` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`sid` varchar(48) NOT NULL,
	`user_id` bigint unsigned NOT NULL,
	`version` int unsigned NOT NULL,
	`ip` varchar(64) NOT NULL,
	`user_agent` varchar(255) NOT NULL,
	`method` varchar(24) NOT NULL,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`last_seen_at` datetime(3) NOT NULL,
	`ended_at` datetime(3),
	CONSTRAINT `user_sessions_id` PRIMARY KEY(`id`),
	CONSTRAINT `user_sessions_sid_uq` UNIQUE(`sid`)
);
--> statement-breakpoint
ALTER TABLE `api_keys` ADD `allowed_cidrs` json;--> statement-breakpoint
ALTER TABLE `users` ADD `session_version` int unsigned DEFAULT 0 NOT NULL;--> statement-breakpoint
ALTER TABLE `users` ADD `totp_secret` varchar(255);--> statement-breakpoint
ALTER TABLE `users` ADD `totp_enabled_at` datetime(3);--> statement-breakpoint
ALTER TABLE `users` ADD `totp_last_step` bigint unsigned;--> statement-breakpoint
ALTER TABLE `recovery_codes` ADD CONSTRAINT `recovery_codes_user_id_users_id_fk` FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `user_sessions` ADD CONSTRAINT `user_sessions_user_id_users_id_fk` FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `user_sessions_user_idx` ON `user_sessions` (`user_id`,`ended_at`);