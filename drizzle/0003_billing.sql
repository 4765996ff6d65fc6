CREATE TABLE `billing_accounts` (
	`organization_id` bigint unsigned NOT NULL,
	`provider_customer_id` varchar(64),
	`plan_code` varchar(32) NOT NULL,
	`period_plan_code` varchar(32) NOT NULL,
	`pending_plan_code` varchar(32),
	`period_start` datetime(3) NOT NULL,
	`period_end` datetime(3) NOT NULL,
	`status` enum('active','past_due','restricted') NOT NULL DEFAULT 'active',
	`past_due_since` datetime(3),
	`payment_method_id` varchar(64),
	`card_brand` varchar(24),
	`card_last4` char(4),
	`card_exp_month` int,
	`card_exp_year` int,
	`billing_name` varchar(160),
	`billing_address` varchar(500),
	`tax_id` varchar(40),
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `billing_accounts_organization_id` PRIMARY KEY(`organization_id`)
);
--> statement-breakpoint
CREATE TABLE `billing_contacts` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`organization_id` bigint unsigned NOT NULL,
	`email` varchar(254) NOT NULL,
	`name` varchar(160) NOT NULL,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `billing_contacts_id` PRIMARY KEY(`id`),
	CONSTRAINT `billing_contacts_org_email_uq` UNIQUE(`organization_id`,`email`)
);
--> statement-breakpoint
CREATE TABLE `invoice_lines` (
	`invoice_id` bigint unsigned NOT NULL,
	`position` int unsigned NOT NULL,
	`description` varchar(300) NOT NULL,
	`quantity` bigint unsigned NOT NULL,
	`unit_label` varchar(80) NOT NULL,
	`amount_minor` bigint NOT NULL,
	CONSTRAINT `invoice_lines_invoice_id_position_pk` PRIMARY KEY(`invoice_id`,`position`)
);
--> statement-breakpoint
CREATE TABLE `invoices` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`organization_id` bigint unsigned NOT NULL,
	`number` varchar(32) NOT NULL,
	`kind` enum('period','proration') NOT NULL,
	`dedupe_key` varchar(80) NOT NULL,
	`provider_invoice_id` varchar(64),
	`plan_code` varchar(32) NOT NULL,
	`period_start` datetime(3) NOT NULL,
	`period_end` datetime(3) NOT NULL,
	`currency` char(3) NOT NULL,
	`total_minor` bigint NOT NULL,
	`units_metered` bigint unsigned NOT NULL DEFAULT 0,
	`status` enum('draft','open','paid','void') NOT NULL DEFAULT 'draft',
	`paid_at` datetime(3),
	`last_payment_error` varchar(300),
	`provider_updated_at` int unsigned,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `invoices_id` PRIMARY KEY(`id`),
	CONSTRAINT `invoices_org_dedupe_uq` UNIQUE(`organization_id`,`kind`,`dedupe_key`),
	CONSTRAINT `invoices_number_uq` UNIQUE(`number`)
);
--> statement-breakpoint
CREATE TABLE `plan_changes` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`organization_id` bigint unsigned NOT NULL,
	`actor_user_id` bigint unsigned,
	`from_plan` varchar(32) NOT NULL,
	`to_plan` varchar(32) NOT NULL,
	`effective_at` datetime(3) NOT NULL,
	`proration_minor` bigint NOT NULL DEFAULT 0,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `plan_changes_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `plans` (
	`code` varchar(32) NOT NULL,
	`label` varchar(64) NOT NULL,
	`rank` int NOT NULL,
	`currency` char(3) NOT NULL,
	`monthly_fee_minor` bigint NOT NULL,
	`included_units` bigint unsigned NOT NULL,
	`overage_per_million_minor` bigint NOT NULL,
	`requests_per_second` int unsigned NOT NULL,
	`monthly_units` bigint unsigned NOT NULL,
	`limits` json NOT NULL,
	`updated_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `plans_code` PRIMARY KEY(`code`)
);
--> statement-breakpoint
CREATE TABLE `processed_events` (
	`event_id` varchar(80) NOT NULL,
	`type` varchar(80) NOT NULL,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `processed_events_event_id` PRIMARY KEY(`event_id`)
);
--> statement-breakpoint
ALTER TABLE `organizations` MODIFY COLUMN `plan` varchar(32) NOT NULL DEFAULT 'free';--> statement-breakpoint
ALTER TABLE `billing_accounts` ADD CONSTRAINT `billing_accounts_organization_id_organizations_id_fk` FOREIGN KEY (`organization_id`) REFERENCES `organizations`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `billing_contacts` ADD CONSTRAINT `billing_contacts_organization_id_organizations_id_fk` FOREIGN KEY (`organization_id`) REFERENCES `organizations`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `invoice_lines` ADD CONSTRAINT `invoice_lines_invoice_id_invoices_id_fk` FOREIGN KEY (`invoice_id`) REFERENCES `invoices`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `invoices` ADD CONSTRAINT `invoices_organization_id_organizations_id_fk` FOREIGN KEY (`organization_id`) REFERENCES `organizations`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `plan_changes` ADD CONSTRAINT `plan_changes_organization_id_organizations_id_fk` FOREIGN KEY (`organization_id`) REFERENCES `organizations`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `plan_changes` ADD CONSTRAINT `plan_changes_actor_user_id_users_id_fk` FOREIGN KEY (`actor_user_id`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `billing_accounts_customer_idx` ON `billing_accounts` (`provider_customer_id`);--> statement-breakpoint
CREATE INDEX `invoices_provider_idx` ON `invoices` (`provider_invoice_id`);--> statement-breakpoint
CREATE INDEX `plan_changes_org_idx` ON `plan_changes` (`organization_id`,`created_at`);