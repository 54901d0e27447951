import "next-auth";
import "next-auth/jwt";

declare module "next-auth" {
  interface Session {
    uid?: number;
    sid?: string;
    role?: string;
  }
}

declare module "next-auth/jwt" {
  interface JWT {
    uid?: number;
    sid?: string;
    role?: string;
  }
}
