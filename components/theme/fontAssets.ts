/**
 * Font files shipped in assets/fonts: nothing is fetched at run time.
 * Metro bundles an asset only when it sees a literal require() of its path.
 */
/* eslint-disable @typescript-eslint/no-require-imports -- asset requires, see above */
export const fontAssets = {
  Inter_400Regular: require('../../assets/fonts/Inter_400Regular.ttf'),
  Inter_500Medium: require('../../assets/fonts/Inter_500Medium.ttf'),
  Inter_600SemiBold: require('../../assets/fonts/Inter_600SemiBold.ttf'),
  Inter_700Bold: require('../../assets/fonts/Inter_700Bold.ttf'),
  RobotoMono_400Regular: require('../../assets/fonts/RobotoMono_400Regular.ttf'),
  RobotoMono_500Medium: require('../../assets/fonts/RobotoMono_500Medium.ttf'),
  RobotoMono_700Bold: require('../../assets/fonts/RobotoMono_700Bold.ttf'),
};
/* eslint-enable @typescript-eslint/no-require-imports */
