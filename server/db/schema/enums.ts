/** PostgreSQL enums, in their own module so tables can share them without import cycles. */
import { pgEnum } from 'drizzle-orm/pg-core';
import { roles } from '../../../shared/api/members.ts';

export const roleEnum = pgEnum('member_role', roles);
