CREATE TABLE `cohort_rows` (
	`id` bigint AUTO_INCREMENT NOT NULL,
	`dataset_id` bigint NOT NULL,
	`segment_id` int NOT NULL,
	`period` int NOT NULL,
	`obligors` int NOT NULL,
	`defaults` int NOT NULL,
	`source_line` int,
	`default_definition` text,
	`note` text,
	CONSTRAINT `cohort_rows_id` PRIMARY KEY(`id`),
	CONSTRAINT `cohort_rows_dataset_segment_period_uq` UNIQUE(`dataset_id`,`segment_id`,`period`)
);
--> statement-breakpoint
CREATE TABLE `dataset_files` (
	`dataset_id` bigint NOT NULL,
	`seq` int NOT NULL,
	`data` longblob NOT NULL,
	CONSTRAINT `dataset_files_dataset_id_seq_pk` PRIMARY KEY(`dataset_id`,`seq`)
);
--> statement-breakpoint
CREATE TABLE `dataset_waivers` (
	`id` bigint AUTO_INCREMENT NOT NULL,
	`dataset_id` bigint NOT NULL,
	`rule` varchar(60) NOT NULL,
	`reason` text NOT NULL,
	`waived_by` int NOT NULL,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `dataset_waivers_id` PRIMARY KEY(`id`),
	CONSTRAINT `dataset_waivers_rule_uq` UNIQUE(`dataset_id`,`rule`)
);
--> statement-breakpoint
CREATE TABLE `datasets` (
	`id` bigint AUTO_INCREMENT NOT NULL,
	`kind` enum('cohort','vintage','loans') NOT NULL,
	`name` varchar(160) NOT NULL,
	`description` text,
	`sha256` varchar(64) NOT NULL,
	`dedupe_key` varchar(64),
	`status` enum('processing','ready','failed') NOT NULL,
	`size_bytes` bigint NOT NULL,
	`file_name` varchar(255) NOT NULL,
	`uploaded_by` int NOT NULL,
	`conventions` json,
	`censored` json,
	`segment_count` int NOT NULL DEFAULT 0,
	`row_count` int NOT NULL DEFAULT 0,
	`warning_count` int NOT NULL DEFAULT 0,
	`superseded_by_id` bigint,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`ready_at` datetime(3),
	CONSTRAINT `datasets_id` PRIMARY KEY(`id`),
	CONSTRAINT `datasets_dedupe_uq` UNIQUE(`dedupe_key`)
);
--> statement-breakpoint
CREATE TABLE `segments` (
	`id` int AUTO_INCREMENT NOT NULL,
	`name` varchar(120) NOT NULL,
	`asset_class` enum('corporate','sme-corporate','residential-mortgage','qualifying-revolving','other-retail','none') NOT NULL DEFAULT 'none',
	`turnover_eur_millions` double,
	`description` text,
	`owner_id` int,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `segments_id` PRIMARY KEY(`id`),
	CONSTRAINT `segments_name_uq` UNIQUE(`name`)
);
--> statement-breakpoint
CREATE TABLE `upload_reports` (
	`id` bigint AUTO_INCREMENT NOT NULL,
	`dataset_id` bigint,
	`kind` enum('cohort','vintage','loans') NOT NULL,
	`name` varchar(160) NOT NULL,
	`file_name` varchar(255) NOT NULL,
	`sha256` varchar(64),
	`size_bytes` bigint NOT NULL,
	`uploaded_by` int NOT NULL,
	`status` enum('accepted','rejected','processing','failed') NOT NULL,
	`error_count` int NOT NULL DEFAULT 0,
	`warning_count` int NOT NULL DEFAULT 0,
	`findings` json NOT NULL,
	`summary` json NOT NULL,
	`job_id` bigint,
	`message` varchar(500),
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`finished_at` datetime(3),
	CONSTRAINT `upload_reports_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
ALTER TABLE `cohort_rows` ADD CONSTRAINT `cohort_rows_dataset_id_datasets_id_fk` FOREIGN KEY (`dataset_id`) REFERENCES `datasets`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `cohort_rows` ADD CONSTRAINT `cohort_rows_segment_id_segments_id_fk` FOREIGN KEY (`segment_id`) REFERENCES `segments`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `dataset_files` ADD CONSTRAINT `dataset_files_dataset_id_datasets_id_fk` FOREIGN KEY (`dataset_id`) REFERENCES `datasets`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `dataset_waivers` ADD CONSTRAINT `dataset_waivers_dataset_id_datasets_id_fk` FOREIGN KEY (`dataset_id`) REFERENCES `datasets`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `dataset_waivers` ADD CONSTRAINT `dataset_waivers_waived_by_users_id_fk` FOREIGN KEY (`waived_by`) REFERENCES `users`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `datasets` ADD CONSTRAINT `datasets_uploaded_by_users_id_fk` FOREIGN KEY (`uploaded_by`) REFERENCES `users`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `datasets` ADD CONSTRAINT `datasets_superseded_by_id_datasets_id_fk` FOREIGN KEY (`superseded_by_id`) REFERENCES `datasets`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `segments` ADD CONSTRAINT `segments_owner_id_users_id_fk` FOREIGN KEY (`owner_id`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `upload_reports` ADD CONSTRAINT `upload_reports_dataset_id_datasets_id_fk` FOREIGN KEY (`dataset_id`) REFERENCES `datasets`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `upload_reports` ADD CONSTRAINT `upload_reports_uploaded_by_users_id_fk` FOREIGN KEY (`uploaded_by`) REFERENCES `users`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `cohort_rows_segment_idx` ON `cohort_rows` (`segment_id`,`period`);--> statement-breakpoint
CREATE INDEX `datasets_sha256_idx` ON `datasets` (`sha256`);--> statement-breakpoint
CREATE INDEX `upload_reports_dataset_idx` ON `upload_reports` (`dataset_id`);--> statement-breakpoint
CREATE INDEX `upload_reports_user_idx` ON `upload_reports` (`uploaded_by`,`created_at`);