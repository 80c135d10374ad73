/**
 * Sessions and sign-in (passport-local). Placeholder until the accounts work
 * lands: nobody is signed in.
 */
import type { Router } from "express";
import type { AppContext } from "../context";

export function installAuth(_api: Router, _ctx: AppContext): void {}
