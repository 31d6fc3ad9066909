// The environment kvarbook was started with: its settings are read from here, never from process.env, which helper processes inherit.
let launch: NodeJS.ProcessEnv = process.env;

/** Called once by main with the environment the executable kept before narrowing process.env. */
export function useLaunchEnvironment(environment: NodeJS.ProcessEnv): void {
  launch = environment;
}

export function launchEnvironment(): NodeJS.ProcessEnv {
  return launch;
}
