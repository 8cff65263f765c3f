CREATE TABLE `finding_events` (
	`id` bigint AUTO_INCREMENT NOT NULL,
	`finding_id` int NOT NULL,
	`kind` varchar(20) NOT NULL,
	`actor_id` int,
	`actor_email` varchar(254) NOT NULL,
	`from_status` varchar(20),
	`to_status` varchar(20),
	`comment` text,
	`at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `finding_events_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `findings` (
	`id` int AUTO_INCREMENT NOT NULL,
	`target_type` enum('fit','dataset','version') NOT NULL,
	`target_id` bigint NOT NULL,
	`title` varchar(200) NOT NULL,
	`description` text NOT NULL,
	`severity` enum('high','medium','low') NOT NULL,
	`owner_id` int NOT NULL,
	`due_date` date NOT NULL,
	`status` enum('open','in_remediation','remediated','accepted','closed') NOT NULL DEFAULT 'open',
	`rationale` text,
	`created_by` int NOT NULL,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `findings_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
ALTER TABLE `finding_events` ADD CONSTRAINT `finding_events_finding_id_findings_id_fk` FOREIGN KEY (`finding_id`) REFERENCES `findings`(`id`) ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `findings` ADD CONSTRAINT `findings_owner_id_users_id_fk` FOREIGN KEY (`owner_id`) REFERENCES `users`(`id`) ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `findings` ADD CONSTRAINT `findings_created_by_users_id_fk` FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `finding_events_finding_idx` ON `finding_events` (`finding_id`,`id`);--> statement-breakpoint
CREATE INDEX `findings_target_idx` ON `findings` (`target_type`,`target_id`);--> statement-breakpoint
CREATE INDEX `findings_status_idx` ON `findings` (`status`,`due_date`);