import type { ServiceConfig } from './config'
import { startMailCatcher, stopMailCatcher } from './mail'
import { startMariadb, stopMariadb } from './mariadb'
import { startPaymentsFake, stopPaymentsFake } from './payments'

/** One local service the app depends on. */
export interface LocalService {
  name: string
  start: (cfg: ServiceConfig) => Promise<boolean>
  stop: (cfg: ServiceConfig) => Promise<boolean>
}

export const mariadb: LocalService = { name: 'MariaDB', start: startMariadb, stop: stopMariadb }
export const mailCatcher: LocalService = { name: 'mail catcher', start: startMailCatcher, stop: stopMailCatcher }
export const paymentsFake: LocalService = { name: 'payments fake', start: startPaymentsFake, stop: stopPaymentsFake }

/** Everything `npm run demo` and `npm run dev` bring up, in start order. */
export const developmentServices: LocalService[] = [mariadb, mailCatcher, paymentsFake]

/** Starts the given services; returns those this call started, so the caller stops only what it started. */
export async function startServices(cfg: ServiceConfig, list: LocalService[]): Promise<LocalService[]> {
  const started: LocalService[] = []
  for (const service of list) {
    if (await service.start(cfg)) started.push(service)
  }
  return started
}

export async function stopServices(cfg: ServiceConfig, list: LocalService[]): Promise<void> {
  for (const service of [...list].reverse()) await service.stop(cfg)
}
