CREATE TABLE `dataset_chunks` (
	`version_id` bigint unsigned NOT NULL,
	`kind` enum('raw','values','weights') NOT NULL,
	`seq` int unsigned NOT NULL,
	`bytes` mediumblob NOT NULL,
	CONSTRAINT `dataset_chunks_version_id_kind_seq_pk` PRIMARY KEY(`version_id`,`kind`,`seq`)
);
--> statement-breakpoint
CREATE TABLE `dataset_versions` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`dataset_id` bigint unsigned NOT NULL,
	`version` int unsigned NOT NULL,
	`file_name` varchar(255) NOT NULL,
	`file_bytes` bigint unsigned NOT NULL,
	`file_sha256` varchar(64) NOT NULL,
	`format` enum('csv','tsv','list') NOT NULL,
	`delimiter` varchar(4),
	`value_column` varchar(255),
	`weight_column` varchar(255),
	`weight_kind` enum('none','counts','weights') NOT NULL,
	`row_count` int unsigned NOT NULL,
	`skipped_rows` int unsigned NOT NULL DEFAULT 0,
	`summary` json NOT NULL,
	`histogram` json NOT NULL,
	`notes` json NOT NULL,
	`created_by` bigint unsigned,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `dataset_versions_id` PRIMARY KEY(`id`),
	CONSTRAINT `dataset_versions_ds_version_uq` UNIQUE(`dataset_id`,`version`)
);
--> statement-breakpoint
CREATE TABLE `datasets` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`public_id` varchar(32) NOT NULL,
	`organization_id` bigint unsigned NOT NULL,
	`owner_id` bigint unsigned,
	`name` varchar(160) NOT NULL,
	`description` text NOT NULL,
	`latest_version` int unsigned NOT NULL DEFAULT 0,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `datasets_id` PRIMARY KEY(`id`),
	CONSTRAINT `datasets_public_id_uq` UNIQUE(`public_id`)
);
--> statement-breakpoint
ALTER TABLE `dataset_chunks` ADD CONSTRAINT `dataset_chunks_version_id_dataset_versions_id_fk` FOREIGN KEY (`version_id`) REFERENCES `dataset_versions`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `dataset_versions` ADD CONSTRAINT `dataset_versions_dataset_id_datasets_id_fk` FOREIGN KEY (`dataset_id`) REFERENCES `datasets`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `dataset_versions` ADD CONSTRAINT `dataset_versions_created_by_users_id_fk` FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `datasets` ADD CONSTRAINT `datasets_organization_id_organizations_id_fk` FOREIGN KEY (`organization_id`) REFERENCES `organizations`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `datasets` ADD CONSTRAINT `datasets_owner_id_users_id_fk` FOREIGN KEY (`owner_id`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `datasets_org_idx` ON `datasets` (`organization_id`);