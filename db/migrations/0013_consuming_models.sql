CREATE TABLE `consuming_model_assumptions` (
	`model_id` int NOT NULL,
	`assumption_id` int NOT NULL,
	`added_by` int NOT NULL,
	`added_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `consuming_model_assumptions_model_id_assumption_id_pk` PRIMARY KEY(`model_id`,`assumption_id`)
);
--> statement-breakpoint
CREATE TABLE `consuming_models` (
	`id` int AUTO_INCREMENT NOT NULL,
	`name` varchar(160) NOT NULL,
	`owner_name` varchar(120) NOT NULL,
	`contact_email` varchar(254) NOT NULL,
	`intended_use` text NOT NULL,
	`webhook_url` varchar(500),
	`webhook_secret` varchar(100),
	`active` boolean NOT NULL DEFAULT true,
	`created_by` int NOT NULL,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `consuming_models_id` PRIMARY KEY(`id`),
	CONSTRAINT `consuming_models_name_uq` UNIQUE(`name`)
);
--> statement-breakpoint
CREATE TABLE `webhook_captured` (
	`id` bigint AUTO_INCREMENT NOT NULL,
	`delivery_id` varchar(36),
	`model_id` int,
	`event` varchar(40),
	`signature_valid` boolean NOT NULL,
	`body` mediumtext NOT NULL,
	`received_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `webhook_captured_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `webhook_deliveries` (
	`id` bigint AUTO_INCREMENT NOT NULL,
	`delivery_id` varchar(36) NOT NULL,
	`model_id` int NOT NULL,
	`event` varchar(40) NOT NULL,
	`version_id` int,
	`url` varchar(500) NOT NULL,
	`body` mediumtext NOT NULL,
	`dedupe_key` varchar(160),
	`status` enum('pending','delivered','failed') NOT NULL DEFAULT 'pending',
	`attempts` int NOT NULL DEFAULT 0,
	`next_attempt_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`last_error` text,
	`last_status` int,
	`delivered_at` datetime(3),
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `webhook_deliveries_id` PRIMARY KEY(`id`),
	CONSTRAINT `webhook_deliveries_delivery_uq` UNIQUE(`delivery_id`),
	CONSTRAINT `webhook_deliveries_dedupe_uq` UNIQUE(`dedupe_key`)
);
--> statement-breakpoint
ALTER TABLE `api_tokens` ADD `model_id` int;--> statement-breakpoint
ALTER TABLE `consuming_model_assumptions` ADD CONSTRAINT `consuming_model_assumptions_model_id_consuming_models_id_fk` FOREIGN KEY (`model_id`) REFERENCES `consuming_models`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `consuming_model_assumptions` ADD CONSTRAINT `consuming_model_assumptions_assumption_id_assumptions_id_fk` FOREIGN KEY (`assumption_id`) REFERENCES `assumptions`(`id`) ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `consuming_model_assumptions` ADD CONSTRAINT `consuming_model_assumptions_added_by_users_id_fk` FOREIGN KEY (`added_by`) REFERENCES `users`(`id`) ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `consuming_models` ADD CONSTRAINT `consuming_models_created_by_users_id_fk` FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `webhook_deliveries` ADD CONSTRAINT `webhook_deliveries_model_id_consuming_models_id_fk` FOREIGN KEY (`model_id`) REFERENCES `consuming_models`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `consuming_model_assumptions_assumption_idx` ON `consuming_model_assumptions` (`assumption_id`);--> statement-breakpoint
CREATE INDEX `webhook_captured_delivery_idx` ON `webhook_captured` (`delivery_id`);--> statement-breakpoint
CREATE INDEX `webhook_deliveries_due_idx` ON `webhook_deliveries` (`status`,`next_attempt_at`);--> statement-breakpoint
CREATE INDEX `webhook_deliveries_model_idx` ON `webhook_deliveries` (`model_id`,`id`);--> statement-breakpoint
ALTER TABLE `api_tokens` ADD CONSTRAINT `api_tokens_model_id_consuming_models_id_fk` FOREIGN KEY (`model_id`) REFERENCES `consuming_models`(`id`) ON DELETE set null ON UPDATE no action;