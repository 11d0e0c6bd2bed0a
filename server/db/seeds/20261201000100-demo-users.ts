import { hashPassword } from '../../auth/password.ts';
import { User } from '../../models/user.model.ts';
import { DEMO_USERS } from '../demo-users.ts';

export async function up(): Promise<void> {
  for (const demo of DEMO_USERS) {
    const existing = await User.findOne({ where: { email: demo.email } });
    if (existing) continue;
    await User.create({
      email: demo.email,
      displayName: demo.displayName,
      role: demo.role,
      passwordHash: await hashPassword(demo.password),
      disabledAt: null,
    });
  }
}
