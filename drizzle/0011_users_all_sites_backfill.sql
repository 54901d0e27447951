-- Until now an empty site list meant every site: say so explicitly for those users (administrators always see all).
UPDATE `users` SET `all_sites` = 1 WHERE `role` = 'admin' OR `id` NOT IN (SELECT `user_id` FROM `user_sites`);
