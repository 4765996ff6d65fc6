CREATE TABLE `saved_model_versions` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`saved_model_id` bigint unsigned NOT NULL,
	`version` int unsigned NOT NULL,
	`model` json NOT NULL,
	`levels` varchar(200),
	`note` varchar(300),
	`created_by` bigint unsigned,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `saved_model_versions_id` PRIMARY KEY(`id`),
	CONSTRAINT `saved_model_versions_uq` UNIQUE(`saved_model_id`,`version`)
);
--> statement-breakpoint
ALTER TABLE `dataset_versions` MODIFY COLUMN `format` enum('csv','tsv','list','xlsx') NOT NULL;--> statement-breakpoint
ALTER TABLE `audit_events` ADD `ip` varchar(64);--> statement-breakpoint
ALTER TABLE `audit_events` ADD `user_agent` varchar(200);--> statement-breakpoint
ALTER TABLE `saved_models` ADD `shared` boolean DEFAULT false NOT NULL;--> statement-breakpoint
ALTER TABLE `saved_models` ADD `latest_version` int unsigned DEFAULT 1 NOT NULL;--> statement-breakpoint
ALTER TABLE `saved_models` ADD `updated_at` datetime(3);--> statement-breakpoint
ALTER TABLE `saved_model_versions` ADD CONSTRAINT `saved_model_versions_saved_model_id_saved_models_id_fk` FOREIGN KEY (`saved_model_id`) REFERENCES `saved_models`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `saved_model_versions` ADD CONSTRAINT `saved_model_versions_created_by_users_id_fk` FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `audit_events_org_action_idx` ON `audit_events` (`organization_id`,`action`);