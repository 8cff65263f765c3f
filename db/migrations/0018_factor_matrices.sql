CREATE TABLE `factor_matrices` (
	`id` int AUTO_INCREMENT NOT NULL,
	`segment_key` varchar(2700) NOT NULL,
	`segments` json NOT NULL,
	`key_hash` varchar(64) NOT NULL,
	`created_by` int NOT NULL,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `factor_matrices_id` PRIMARY KEY(`id`),
	CONSTRAINT `factor_matrices_key_uq` UNIQUE(`key_hash`)
);
--> statement-breakpoint
CREATE TABLE `factor_matrix_audit` (
	`id` bigint AUTO_INCREMENT NOT NULL,
	`matrix_id` int NOT NULL,
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
	CONSTRAINT `factor_matrix_audit_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `factor_matrix_versions` (
	`id` int AUTO_INCREMENT NOT NULL,
	`matrix_id` int NOT NULL,
	`version` int NOT NULL,
	`status` enum('draft','submitted','in_review','approved','rejected','published','superseded','expired','retired') NOT NULL DEFAULT 'draft',
	`fit_run_id` bigint,
	`dataset_id` bigint,
	`dataset_sha256` varchar(64) NOT NULL,
	`engine_version` varchar(60) NOT NULL,
	`seeds` json NOT NULL,
	`window_from` varchar(20) NOT NULL,
	`window_to` varchar(20) NOT NULL,
	`segments` json NOT NULL,
	`pairs` json NOT NULL,
	`estimated` json NOT NULL,
	`smallest_eigenvalue` double NOT NULL,
	`nearest` json,
	`largest_change` json,
	`margin` double NOT NULL DEFAULT 0,
	`margin_rationale` text NOT NULL,
	`value` json NOT NULL,
	`value_smallest_eigenvalue` double NOT NULL,
	`intended_uses` text NOT NULL,
	`limitations` text NOT NULL,
	`effective_date` date NOT NULL,
	`review_by` date NOT NULL,
	`content_hash` varchar(64) NOT NULL,
	`author_id` int NOT NULL,
	`validator_id` int,
	`decision_comment` text,
	`decided_at` datetime(3),
	`published_at` datetime(3),
	`ended_at` datetime(3),
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `factor_matrix_versions_id` PRIMARY KEY(`id`),
	CONSTRAINT `factor_matrix_versions_uq` UNIQUE(`matrix_id`,`version`)
);
--> statement-breakpoint
ALTER TABLE `factor_matrices` ADD CONSTRAINT `factor_matrices_created_by_users_id_fk` FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `factor_matrix_versions` ADD CONSTRAINT `factor_matrix_versions_matrix_id_factor_matrices_id_fk` FOREIGN KEY (`matrix_id`) REFERENCES `factor_matrices`(`id`) ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `factor_matrix_versions` ADD CONSTRAINT `factor_matrix_versions_fit_run_id_fit_runs_id_fk` FOREIGN KEY (`fit_run_id`) REFERENCES `fit_runs`(`id`) ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `factor_matrix_versions` ADD CONSTRAINT `factor_matrix_versions_dataset_id_datasets_id_fk` FOREIGN KEY (`dataset_id`) REFERENCES `datasets`(`id`) ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `factor_matrix_versions` ADD CONSTRAINT `factor_matrix_versions_author_id_users_id_fk` FOREIGN KEY (`author_id`) REFERENCES `users`(`id`) ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `factor_matrix_versions` ADD CONSTRAINT `factor_matrix_versions_validator_id_users_id_fk` FOREIGN KEY (`validator_id`) REFERENCES `users`(`id`) ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `factor_matrix_audit_matrix_idx` ON `factor_matrix_audit` (`matrix_id`,`id`);--> statement-breakpoint
CREATE INDEX `factor_matrix_audit_version_idx` ON `factor_matrix_audit` (`version_id`);--> statement-breakpoint
CREATE INDEX `factor_matrix_versions_status_idx` ON `factor_matrix_versions` (`status`,`effective_date`);