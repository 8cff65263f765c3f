CREATE TABLE `api_tokens` (
	`id` int AUTO_INCREMENT NOT NULL,
	`name` varchar(120) NOT NULL,
	`prefix` varchar(16) NOT NULL,
	`token_hash` varchar(64) NOT NULL,
	`scopes` json NOT NULL,
	`created_by` int NOT NULL,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`expires_at` datetime(3),
	`last_used_at` datetime(3),
	`revoked_at` datetime(3),
	`revoked_by` int,
	CONSTRAINT `api_tokens_id` PRIMARY KEY(`id`),
	CONSTRAINT `api_tokens_hash_uq` UNIQUE(`token_hash`)
);
--> statement-breakpoint
CREATE TABLE `assumption_audit` (
	`id` bigint AUTO_INCREMENT NOT NULL,
	`assumption_id` int NOT NULL,
	`version_id` int NOT NULL,
	`version` int NOT NULL,
	`action` varchar(30) NOT NULL,
	`actor_id` int,
	`actor_email` varchar(254) NOT NULL,
	`actor_role` varchar(20) NOT NULL,
	`from_status` varchar(20),
	`to_status` varchar(20) NOT NULL,
	`comment` text,
	`content_hash` varchar(64) NOT NULL,
	`at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `assumption_audit_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `assumption_reviews` (
	`id` int AUTO_INCREMENT NOT NULL,
	`version_id` int NOT NULL,
	`reviewer_id` int NOT NULL,
	`action` varchar(30) NOT NULL,
	`comment` text,
	`content_hash` varchar(64) NOT NULL,
	`voided` boolean NOT NULL DEFAULT false,
	`at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `assumption_reviews_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `assumption_versions` (
	`id` int AUTO_INCREMENT NOT NULL,
	`assumption_id` int NOT NULL,
	`version` int NOT NULL,
	`status` enum('draft','submitted','in_review','approved','rejected','published','superseded','expired','retired') NOT NULL DEFAULT 'draft',
	`fit_run_id` bigint,
	`dataset_id` bigint,
	`dataset_sha256` varchar(64) NOT NULL,
	`engine_version` varchar(40) NOT NULL,
	`seeds` json NOT NULL,
	`estimator` varchar(40) NOT NULL,
	`estimate` double NOT NULL,
	`interval_method` varchar(20) NOT NULL,
	`interval_level` double NOT NULL,
	`interval_lower` double NOT NULL,
	`interval_upper` double NOT NULL,
	`pd` double NOT NULL,
	`window_from` varchar(20) NOT NULL,
	`window_to` varchar(20) NOT NULL,
	`margin_data` double NOT NULL DEFAULT 0,
	`margin_data_rationale` text NOT NULL,
	`margin_practice` double NOT NULL DEFAULT 0,
	`margin_practice_rationale` text NOT NULL,
	`margin_general` double NOT NULL DEFAULT 0,
	`margin_general_rationale` text NOT NULL,
	`conservative_value` double NOT NULL,
	`final_value` double NOT NULL,
	`intended_uses` text NOT NULL,
	`limitations` text NOT NULL,
	`effective_date` date NOT NULL,
	`review_by` date NOT NULL,
	`content_hash` varchar(64) NOT NULL,
	`author_id` int NOT NULL,
	`last_edited_by` int,
	`validator_id` int,
	`decision_comment` text,
	`decided_at` datetime(3),
	`published_at` datetime(3),
	`ended_at` datetime(3),
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `assumption_versions_id` PRIMARY KEY(`id`),
	CONSTRAINT `assumption_versions_uq` UNIQUE(`assumption_id`,`version`)
);
--> statement-breakpoint
CREATE TABLE `assumptions` (
	`id` int AUTO_INCREMENT NOT NULL,
	`segment` varchar(120) NOT NULL,
	`created_by` int NOT NULL,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `assumptions_id` PRIMARY KEY(`id`),
	CONSTRAINT `assumptions_segment_uq` UNIQUE(`segment`)
);
--> statement-breakpoint
CREATE TABLE `mail_captured` (
	`id` bigint AUTO_INCREMENT NOT NULL,
	`outbox_id` bigint,
	`envelope_from` varchar(254) NOT NULL,
	`envelope_to` json NOT NULL,
	`raw` mediumtext NOT NULL,
	`received_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `mail_captured_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `mail_outbox` (
	`id` bigint AUTO_INCREMENT NOT NULL,
	`kind` varchar(40) NOT NULL,
	`to_address` varchar(254) NOT NULL,
	`subject` varchar(300) NOT NULL,
	`body` text NOT NULL,
	`version_id` int,
	`dedupe_key` varchar(160),
	`status` enum('pending','sent','failed') NOT NULL DEFAULT 'pending',
	`attempts` int NOT NULL DEFAULT 0,
	`next_attempt_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`last_error` text,
	`sent_at` datetime(3),
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `mail_outbox_id` PRIMARY KEY(`id`),
	CONSTRAINT `mail_outbox_dedupe_uq` UNIQUE(`dedupe_key`)
);
--> statement-breakpoint
ALTER TABLE `api_tokens` ADD CONSTRAINT `api_tokens_created_by_users_id_fk` FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `api_tokens` ADD CONSTRAINT `api_tokens_revoked_by_users_id_fk` FOREIGN KEY (`revoked_by`) REFERENCES `users`(`id`) ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `assumption_reviews` ADD CONSTRAINT `assumption_reviews_version_id_assumption_versions_id_fk` FOREIGN KEY (`version_id`) REFERENCES `assumption_versions`(`id`) ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `assumption_reviews` ADD CONSTRAINT `assumption_reviews_reviewer_id_users_id_fk` FOREIGN KEY (`reviewer_id`) REFERENCES `users`(`id`) ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `assumption_versions` ADD CONSTRAINT `assumption_versions_assumption_id_assumptions_id_fk` FOREIGN KEY (`assumption_id`) REFERENCES `assumptions`(`id`) ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `assumption_versions` ADD CONSTRAINT `assumption_versions_author_id_users_id_fk` FOREIGN KEY (`author_id`) REFERENCES `users`(`id`) ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `assumption_versions` ADD CONSTRAINT `assumption_versions_last_edited_by_users_id_fk` FOREIGN KEY (`last_edited_by`) REFERENCES `users`(`id`) ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `assumption_versions` ADD CONSTRAINT `assumption_versions_validator_id_users_id_fk` FOREIGN KEY (`validator_id`) REFERENCES `users`(`id`) ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `assumptions` ADD CONSTRAINT `assumptions_created_by_users_id_fk` FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `assumption_audit_assumption_idx` ON `assumption_audit` (`assumption_id`,`id`);--> statement-breakpoint
CREATE INDEX `assumption_audit_version_idx` ON `assumption_audit` (`version_id`);--> statement-breakpoint
CREATE INDEX `assumption_reviews_version_idx` ON `assumption_reviews` (`version_id`);--> statement-breakpoint
CREATE INDEX `assumption_versions_status_idx` ON `assumption_versions` (`status`,`effective_date`);--> statement-breakpoint
CREATE INDEX `mail_captured_outbox_idx` ON `mail_captured` (`outbox_id`);--> statement-breakpoint
CREATE INDEX `mail_outbox_due_idx` ON `mail_outbox` (`status`,`next_attempt_at`);