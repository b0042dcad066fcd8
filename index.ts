// The app's entry. Settings that must hold before any other module runs come
// first; then Expo Router's own entry, which loads the screens under app/.
import './components/zodSetup';
import 'expo-router/entry';
